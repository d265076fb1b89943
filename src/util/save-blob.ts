/** Hands a downloaded Blob to the browser as a file named `file` (the usual object-URL and link click). */
export function saveBlob(blob: Blob, file: string): void {
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = file;
  document.body.append(link);
  link.click();
  link.remove();
  // The download has taken the data by the time the click returns; the URL is released a little later.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
