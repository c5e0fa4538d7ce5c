import { AreaLayout } from "./area-layout.tsx";

export function OfficeLayout() {
  return (
    <AreaLayout
      name="Site office"
      roles={["admin", "lead", "marketing"]}
      links={[
        { to: "/office", label: "Overview", end: true },
        { to: "/office/outbox", label: "Outbox" },
        { to: "/office/users", label: "Users", roles: ["admin"] },
        { to: "/office/audit", label: "Audit log", roles: ["admin"] },
      ]}
    />
  );
}
