import { auditLoader, AuditPage } from "../../features/audit/routes.tsx";
import { RequireRole } from "../../features/auth/components/require-role.tsx";
import { usersLoader, UsersPage } from "../../features/users/routes.tsx";

// The pages' own loaders, which prime only for an administrator (the guard below refuses anyone else).
export const adminUsersLoader = usersLoader;
export const adminAuditLoader = auditLoader;

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
