import { AuditPage } from "../../features/audit/routes.tsx";
import { RequireRole } from "../../features/auth/components/require-role.tsx";
import { UsersPage } from "../../features/users/routes.tsx";

export function AdminUsersPage() {
  return (
    <RequireRole roles={["admin"]} area="users page">
      <UsersPage />
    </RequireRole>
  );
}

export function AdminAuditPage() {
  return (
    <RequireRole roles={["admin"]} area="audit log">
      <AuditPage />
    </RequireRole>
  );
}
