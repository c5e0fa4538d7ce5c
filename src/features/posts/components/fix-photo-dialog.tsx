import { useEffect, useState } from "react";
import { Link } from "react-router-dom";
import type { Role } from "#shared/schemas/common.ts";
import type { MediaPicture } from "#shared/schemas/media.ts";
import type { PublishingProblem } from "#shared/schemas/publishing.ts";
import { Button } from "../../../components/ui/button.tsx";
import { Dialog } from "../../../components/ui/dialog.tsx";
import { TextAreaField } from "../../../components/ui/field.tsx";
import { Picture } from "../../../components/ui/picture.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { usePatchMedia } from "../api.ts";

/**
 * Fixes what stops a photo being published, where the writer found it: its alt text
 * (anyone on staff) and, for leads, its clearance. Both change the library item itself.
 */
export function FixPhotoDialog({
  slug,
  postId,
  picture,
  problems,
  role,
  onClose,
  onFixed,
}: {
  slug: string;
  postId?: number;
  picture: MediaPicture | null;
  problems: readonly PublishingProblem[];
  role: Role;
  onClose: () => void;
  /** What was fixed: the alt text (with the photo as it now is) or the clearance. */
  onFixed: (p: MediaPicture, fixed: "alt" | "cleared") => void;
}) {
  const [alt, setAlt] = useState(picture?.altText ?? "");
  const [altDone, setAltDone] = useState(false);
  const [cleared, setCleared] = useState(false);
  useEffect(() => setAlt(picture?.altText ?? ""), [picture]);
  const patch = usePatchMedia(slug, postId);
  if (!picture) return null;
  const needsClearance = problems.some((p) => p.code === "not_cleared");
  const altMissing = problems.some((p) => p.code === "missing_alt_text") || !picture.altText?.trim();
  const lead = role === "lead" || role === "admin";
  const fieldError = patch.error instanceof ApiError ? (patch.error.fields.altText ?? undefined) : undefined;
  return (
    <Dialog
      open
      title="Fix this photo"
      onClose={onClose}
      dismiss="Close"
      footer={
        <>
          {lead && needsClearance && !cleared ? (
            <Button
              busy={patch.isPending && patch.variables?.patch.sensitivity === "cleared"}
              onClick={() =>
                patch.mutate(
                  { id: picture.id, patch: { sensitivity: "cleared" } },
                  {
                    onSuccess: () => {
                      onFixed(picture, "cleared");
                      setCleared(true);
                      if (altDone || !altMissing) onClose();
                    },
                  },
                )
              }
            >
              Clear it for publication
            </Button>
          ) : null}
          <Button
            variant="primary"
            busy={patch.isPending && patch.variables?.patch.altText !== undefined}
            disabled={!alt.trim()}
            onClick={() =>
              patch.mutate(
                { id: picture.id, patch: { altText: alt } },
                {
                  onSuccess: () => {
                    onFixed({ ...picture, altText: alt.trim() }, "alt");
                    setAltDone(true);
                    // A lead may still have the clearance to give here; otherwise the fix is done.
                    if (!(lead && needsClearance && !cleared)) onClose();
                  },
                },
              )
            }
          >
            Save alt text
          </Button>
        </>
      }
    >
      <div className="flex flex-col gap-3">
        <Picture picture={picture} sizes="28rem" />
        {problems
          .filter((p) => !(altDone && p.code === "missing_alt_text") && !(cleared && p.code === "not_cleared"))
          .map((p) => (
            <p key={`${p.code}-${p.message}`} className="text-sm font-medium text-bad">
              ▲ {p.message}
            </p>
          ))}
        {altDone ? <p className="text-sm font-medium text-good">✓ Alt text saved</p> : null}
        {cleared ? <p className="text-sm font-medium text-good">✓ Cleared for publication</p> : null}
        <TextAreaField
          label="Alt text"
          rows={3}
          value={alt}
          onChange={(e) => setAlt(e.target.value)}
          error={fieldError}
          hint="What the photo shows, for someone who cannot see it: “Three chillers on their plinths in the plant yard”. Kept with the photo in the library."
        />
        {needsClearance && !lead ? <p className="text-sm text-ink-soft">A lead has to clear this photo before it can be published; they can do it from the review queue or from this update.</p> : null}
        <p className="flex flex-wrap gap-x-4 text-sm">
          <Link to={`/office/media?project=${slug}&missingAlt=true`} className="underline underline-offset-4">
            Photos without alt text in the library
          </Link>
          {needsClearance ? (
            <Link to={`/office/media/review?project=${slug}`} className="underline underline-offset-4">
              The review queue
            </Link>
          ) : null}
        </p>
      </div>
    </Dialog>
  );
}
