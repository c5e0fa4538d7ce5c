import { ReportPage, ReportsPage } from "../../features/reports/routes.tsx";
import { WithReportParts } from "./report-parts.tsx";

export { reportLoader, reportsLoader } from "../../features/reports/routes.tsx";

export function OfficeReportsPage() {
  return <ReportsPage />;
}

export function OfficeReportPage() {
  return (
    <WithReportParts>
      <ReportPage />
    </WithReportParts>
  );
}
