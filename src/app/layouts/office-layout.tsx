import { AreaLayout } from "./area-layout.tsx";

export function OfficeLayout() {
  return (
    <AreaLayout
      name="Site office"
      roles={["admin", "lead", "marketing"]}
      links={[
        { to: "/office", label: "Overview", end: true },
        { to: "/office/programme", label: "Programme" },
        { to: "/office/facility", label: "Facility", roles: ["marketing", "lead", "admin"] },
        { to: "/office/site-plan", label: "Site plan" },
        { to: "/office/risks", label: "Risks" },
        { to: "/office/decisions", label: "Decisions" },
        { to: "/office/budget", label: "Budget", roles: ["lead", "admin"] },
        { to: "/office/documents", label: "Documents" },
        { to: "/office/reports", label: "Reports", roles: ["lead", "admin"] },
        { to: "/office/media", label: "Media" },
        { to: "/office/updates", label: "Updates" },
        { to: "/office/stories", label: "Photo stories" },
        { to: "/office/subscribers", label: "Subscribers", roles: ["marketing", "lead", "admin"] },
        { to: "/office/enquiries", label: "Enquiries", roles: ["marketing", "lead", "admin"] },
        { to: "/office/digests", label: "Digests", roles: ["marketing", "lead", "admin"] },
        { to: "/office/outbox", label: "Outbox", roles: ["admin"] },
        { to: "/office/users", label: "Users", roles: ["admin"] },
        { to: "/office/audit", label: "Audit log", roles: ["admin"] },
      ]}
    />
  );
}
