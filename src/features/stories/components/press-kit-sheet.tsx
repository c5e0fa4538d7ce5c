import { useMutation } from "@tanstack/react-query";
import { toast } from "sonner";
import { Button } from "../../../components/ui/button.tsx";
import { Sheet } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { downloadPressKit } from "../../../lib/press-kit-download.ts";

/** The story's photographs as one zip (2400 px, with the manifest), for a journalist who asks (decision 062). */
export function PressKitSheet({ slug, storyId }: { slug: string; storyId: number }) {
  const download = useMutation({ mutationFn: () => downloadPressKit(slug, { storyId, size: "2400" }) });
  return (
    <Sheet label="Press kit">
      <p className="text-sm text-ink-soft">The story's cleared photographs, 2400 px wide, with their captions, credits and the project's usage terms in a manifest.</p>
      <Button
        size="sm"
        className="mt-2"
        busy={download.isPending}
        onClick={() => download.mutate(undefined, { onError: (e) => toast.error(e instanceof ApiError ? e.message : "The press kit could not be made.") })}
      >
        Download these photographs
      </Button>
    </Sheet>
  );
}
