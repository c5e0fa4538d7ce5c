import { useId, useState } from "react";
import { Button } from "../../components/ui/button.tsx";
import { ShownOnceAddress } from "../../components/ui/shown-once-address.tsx";
import { useMakeCalendarFeed, useStopCalendarFeed } from "./api.ts";

type Status = { kind: "none" } | { kind: "made"; url: string } | { kind: "copied"; url: string } | { kind: "stopped" } | { kind: "error"; message: string };

const messageOf = (e: unknown) => (e instanceof Error ? e.message : "Something went wrong. Try again.");

/**
 * "Follow these dates in your calendar": a personal calendar address for one project, with what
 * the reader may see (investors: investor milestones, decisions' needed-by dates, report issue
 * dates; staff: internal ones too). The address is shown once, when it is made; making another
 * stops the earlier one, and it can be stopped outright.
 */
export function CalendarFeedPanel({ slug, projectName }: { slug: string; projectName?: string }) {
  const make = useMakeCalendarFeed(slug);
  const stop = useStopCalendarFeed(slug);
  const [status, setStatus] = useState<Status>({ kind: "none" });
  const headingId = useId();
  const url = status.kind === "made" || status.kind === "copied" ? status.url : null;

  const onMake = () =>
    make.mutate(undefined, {
      onSuccess: (feed) => setStatus({ kind: "made", url: feed.url }),
      onError: (e) => setStatus({ kind: "error", message: messageOf(e) }),
    });
  const onStop = () =>
    stop.mutate(undefined, {
      onSuccess: () => setStatus({ kind: "stopped" }),
      onError: (e) => setStatus({ kind: "error", message: messageOf(e) }),
    });
  const onCopy = async () => {
    if (!url) return;
    try {
      await navigator.clipboard.writeText(url);
      setStatus({ kind: "copied", url });
    } catch {
      setStatus({ kind: "error", message: "Copying was not allowed here: select the address and copy it yourself." });
    }
  };

  return (
    <section aria-labelledby={headingId} className="mt-8 border-t border-rule pt-6" data-testid="calendar-feed-panel">
      <h2 id={headingId} className="label-caps">
        Follow these dates in your calendar{projectName ? `: ${projectName}` : ""}
      </h2>
      <p className="mt-2 max-w-prose text-sm text-ink-soft">
        Your own calendar address for this build: milestones, ready-for-service dates and the dates that matter to you. Your calendar app checks it and moves a date when the forecast moves. Keep it to
        yourself: anyone who has it sees what you see. It is shown once; making a new one stops the old one.
      </p>
      <div className="mt-3 flex flex-wrap gap-2">
        <Button size="sm" onClick={onMake} busy={make.isPending}>
          {url ? "Make a new address" : "Make my calendar address"}
        </Button>
        <Button size="sm" variant="danger" onClick={onStop} busy={stop.isPending}>
          Stop my calendar address
        </Button>
      </div>
      {url ? (
        <ShownOnceAddress label="Your calendar address (shown only now)" url={url} onCopy={() => void onCopy()}>
          <p className="mt-1 text-sm" role="status">
            {status.kind === "copied" ? "✓ Copied. Add it in your calendar app as a subscription (from a URL)." : "Add it in your calendar app as a subscription (from a URL)."}
          </p>
        </ShownOnceAddress>
      ) : null}
      {status.kind === "stopped" ? (
        <p className="mt-3 text-sm" role="status">
          ✓ Stopped: calendars subscribed to your old address get no more dates.
        </p>
      ) : null}
      {status.kind === "error" ? (
        <p className="mt-3 text-sm text-bad" role="alert">
          ✕ {status.message}
        </p>
      ) : null}
    </section>
  );
}
