import { AreaLayout } from "./area-layout.tsx";

export function InvestorLayout() {
  return (
    <AreaLayout
      name="Investor room"
      roles={["investor", "admin", "lead", "marketing"]}
      links={[
        { to: "/investors", label: "Projects", end: true },
        { to: "/investors/digest", label: "My digest", roles: ["investor"] },
      ]}
    />
  );
}
