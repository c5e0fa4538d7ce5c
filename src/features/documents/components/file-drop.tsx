import { useDropzone } from "react-dropzone";
import { Button } from "../../../components/ui/button.tsx";
import { formatBytes } from "../../../lib/format.ts";
import { DOCUMENT_ACCEPT } from "../words.ts";

/** Drag one PDF or image in, or choose it; the chosen file is named with its size. */
export function FileDrop({ file, onFile, label }: { file: File | null; onFile: (f: File | null) => void; label: string }) {
  const { getRootProps, getInputProps, isDragActive, open, fileRejections } = useDropzone({
    onDrop: (accepted) => onFile(accepted[0] ?? null),
    accept: DOCUMENT_ACCEPT,
    multiple: false,
    noClick: true,
    noKeyboard: true,
  });
  return (
    <div
      {...getRootProps({
        className: `flex flex-col items-center justify-center gap-2 border-2 border-dashed px-4 py-6 text-center ${isDragActive ? "border-accent bg-accent-wash" : "border-rule-strong bg-paper"}`,
        "aria-label": `Drop ${label} here`,
      })}
    >
      <input {...getInputProps({ "aria-label": label })} data-testid="document-file-input" />
      {file ? (
        <p className="font-medium" data-testid="chosen-file">
          {file.name} <span className="tabular text-sm font-normal text-ink-soft">· {formatBytes(file.size)}</span>
        </p>
      ) : (
        <p className="font-medium">{isDragActive ? "Drop to choose it" : "Drag a PDF or an image here"}</p>
      )}
      <p className="text-sm text-ink-soft">PDF, JPEG, PNG or WebP. Scripts, launch actions and attached files are taken out of a PDF before it is stored.</p>
      <Button size="sm" onClick={open}>
        {file ? "Choose another file" : "Choose a file"}
      </Button>
      {fileRejections.length ? (
        <p role="alert" className="text-sm text-bad">
          ▲ {fileRejections[0]?.file.name} is not a PDF or an image.
        </p>
      ) : null}
    </div>
  );
}
