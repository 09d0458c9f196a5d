// A line note as the charts show it (db/queries/notes.ts reads and writes them).

export const NOTE_MAX_LENGTH = 500;

export type LineNote = {
  id: number;
  lineId: number;
  pointId: number | null;
  ts: number;
  text: string;
  personName: string;
  createdTs: number;
};
