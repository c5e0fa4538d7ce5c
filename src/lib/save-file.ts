/** Hands bytes made in the page to the browser's own download (a file the user keeps), then lets them go. */
export function saveFile(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = fileName;
  document.body.append(a);
  a.click();
  a.remove();
  // Revoked after the click has started the download, not before.
  setTimeout(() => URL.revokeObjectURL(url), 60_000);
}
