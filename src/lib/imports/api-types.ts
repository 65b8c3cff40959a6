/** JSON shapes of the trend-file API (preview, commit, list, withdraw), shared with the upload island. */
import type { RefusalGroup, RowProblem, UnfitColumn } from './trend-csv.ts';

export interface ImportView {
  id: number;
  patientId: number;
  fileName: string;
  fileHash: string;
  fileBytes: number;
  rowsInFile: number;
  rowsStored: number;
  rowsSkipped: number;
  rowsRefused: number;
  firstAt: string | null;
  lastAt: string | null;
  committedAt: string;
  committedBy: string;
  withdrawnAt: string | null;
  withdrawnBy: string | null;
  withdrawReason: string | null;
}

export interface TrendPreview {
  fileName: string;
  fileHash: string;
  fileBytes: number;
  timeZone: string;
  headers: string[];
  rowCount: number;
  readable: number;
  toStore: number;
  span: { first: string; last: string } | null;
  outsideAdmission: { count: number; examples: { line: number; at: string }[] };
  overlapping: { count: number; examples: { line: number; at: string }[] };
  refused: { count: number; rows: RowProblem[]; groups: RefusalGroup[] };
  notes: RowProblem[];
  unfitColumns: UnfitColumn[];
  alreadyImported: { importId: number; committedAt: string; committedBy: string; samePatient: boolean } | null;
}
