import { useMutation } from "@tanstack/react-query";
import { useState } from "react";
import { toast } from "sonner";
import { PRESS_KIT_SIZES, type PressKitInput } from "#shared/schemas/writing-help.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField } from "../../../components/ui/field.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { downloadPressKit } from "../../../lib/press-kit-download.ts";

type Size = (typeof PRESS_KIT_SIZES)[number];
const SIZE_WORDS: Record<Size, string> = {
  "640": "640 px wide (web and e-mail)",
  "1200": "1200 px wide (articles)",
  "2400": "2400 px wide (print and large screens)",
  original: "Full size, without the camera's metadata",
};

/** The selected photos as one zip with a manifest of captions, credits, dates, areas and alt text (decision 062). */
export function PressKitBar({ slug, ids }: { slug: string; ids: number[] }) {
  const [size, setSize] = useState<Size>("2400");
  const download = useMutation({ mutationFn: (input: PressKitInput) => downloadPressKit(slug, input) });
  const start = () =>
    download.mutate(
      { mediaIds: ids, size },
      {
        onSuccess: () => toast.success("Press kit downloaded; any photo left out is listed in its manifest.txt"),
        onError: (e) => toast.error(e instanceof ApiError ? e.message : "The press kit could not be made."),
      },
    );
  return (
    <section aria-label="Download the selected photos" className="flex flex-col gap-3 border border-rule-strong bg-sheet p-3 sm:flex-row sm:items-end">
      <SelectField label="Press kit size" value={size} onChange={(e) => setSize(e.target.value as Size)} options={PRESS_KIT_SIZES.map((s) => ({ value: s, label: SIZE_WORDS[s] }))} />
      <Button onClick={start} busy={download.isPending}>
        Download as a press kit ({ids.length})
      </Button>
      <p className="text-sm text-ink-soft sm:max-w-xs">Only cleared photos go in; restricted, unreviewed or flagged ones are left out and listed as withheld.</p>
    </section>
  );
}
