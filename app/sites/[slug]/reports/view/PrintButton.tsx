"use client";

/** Opens the browser's print dialogue (the report's print stylesheet does the rest). */
export function PrintButton() {
  return (
    <button type="button" onClick={() => window.print()}>
      Print
    </button>
  );
}
