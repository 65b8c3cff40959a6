/** JSON shape of `GET /api/board` (what the endpoint sends and the board island reads). */
import type { BoardTile } from './tiles.ts';

/** A tile with what the signed-in person may do from it, decided on the server. */
export type BoardTileView = BoardTile & { can: { claim: boolean } };

export interface BoardResponse {
  unit: { code: string; name: string; timeZone: string };
  units: { code: string; name: string }[];
  generatedAt: string;
  settings: { overdueMin: number };
  tiles: BoardTileView[];
  /** What the signed-in person may do on the board as a whole: assign nurses to beds, and keep to their own beds. */
  can: { assignNurses: boolean; filterMine: boolean };
}
