import { lazy, Suspense, type ComponentProps } from "react";
import { Spinner } from "../../../components/ui/sheet.tsx";

// recharts is large; it loads only where a chart is shown.
const Charts = lazy(() => import("./programme-charts.tsx").then((m) => ({ default: m.ProgrammeCharts })));

export function LazyProgrammeCharts(props: ComponentProps<typeof Charts>) {
  return (
    <Suspense fallback={<Spinner label="Loading the charts" />}>
      <Charts {...props} />
    </Suspense>
  );
}
