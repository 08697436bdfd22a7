/** Hands a text to the browser as a file download (the one DOM-only helper of the Models page). */
export function downloadText(fileName: string, text: string, type = 'application/json'): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = fileName;
  a.style.display = 'none';
  document.body.append(a);
  a.click();
  a.remove();
  // Chromium reads the blob after the click returns; let go of it a little later.
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
