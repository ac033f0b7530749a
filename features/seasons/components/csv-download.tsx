"use client";

import { toCsv } from "@/features/seasons/csv";
import { saveBlob } from "@/features/seasons/components/download";

/** A button that saves rows (first row = header) as a CSV file. */
export function CsvDownload({ rows, fileName, children }: { rows: Array<Array<string | number | null>>; fileName: string; children: React.ReactNode }) {
  return (
    <button
      type="button"
      className="btn-quiet px-2.5 py-1 text-xs"
      onClick={() => saveBlob(new Blob([toCsv(rows)], { type: "text/csv;charset=utf-8" }), fileName)}
    >
      {children}
    </button>
  );
}
