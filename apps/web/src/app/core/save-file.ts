import { DOCUMENT } from '@angular/common';
import { inject } from '@angular/core';

/**
 * Returns a function that saves a Blob as a file: API downloads (they need the bearer token, so
 * they are fetched first and then handed to the browser) and files made in the page (CSV). Call
 * in an injection context.
 */
export function injectSaveFile(): (blob: Blob, fileName: string) => void {
  const document = inject(DOCUMENT);
  return (blob, fileName) => {
    const url = URL.createObjectURL(blob);
    const a = document.createElement('a');
    a.href = url;
    a.download = fileName;
    a.style.display = 'none';
    document.body.appendChild(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 1000);
  };
}

/** Reads a chosen file as text. */
export function readFileText(file: Blob): Promise<string> {
  if (typeof file.text === 'function') return file.text();
  return new Promise((resolve, reject) => {
    const reader = new FileReader();
    reader.onload = () => resolve(String(reader.result ?? ''));
    reader.onerror = () => reject(reader.error ?? new Error('The file could not be read'));
    reader.readAsText(file);
  });
}
