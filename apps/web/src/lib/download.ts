/**
 * Hands a blob to the browser as a file download. Used where the API needs a bearer
 * token, so a plain link would be refused.
 */
export function saveBlob(blob: Blob, filename: string): void {
  const url = URL.createObjectURL(blob);
  const link = document.createElement('a');
  link.href = url;
  link.download = filename;
  link.rel = 'noopener';
  document.body.append(link);
  link.click();
  link.remove();
  // Revoked on the next task: some browsers start the download only after click() returns.
  setTimeout(() => URL.revokeObjectURL(url), 0);
}
