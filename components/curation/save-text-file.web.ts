/** Hands a text file to the browser's download (a Blob URL on a temporary link). */
export async function saveTextFile(filename: string, text: string, mimeType = "text/csv"): Promise<void> {
  const url = URL.createObjectURL(new Blob([text], { type: `${mimeType};charset=utf-8` }));
  const a = document.createElement("a");
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
