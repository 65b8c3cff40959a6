/** Patient search: the query schema and result shape shared by the header island and the endpoint. */
import { z } from 'zod';

export const searchQuerySchema = z.object({
  q: z.string().trim().min(2, 'Type at least 2 characters').max(60, 'At most 60 characters'),
  discharged: z.enum(['include', 'exclude']).default('exclude'),
  limit: z.coerce.number().int().min(1).max(50).default(20),
});

export interface SearchResult {
  id: number;
  mrn: string;
  givenName: string;
  familyName: string;
  label: string;
  /** The current bed, or the last one for a discharged patient. */
  bedLabel: string;
  unitCode: string;
  unitName: string;
  discharged: boolean;
}

/** Words of the query, at most five (every one must match). */
export function searchTokens(q: string): string[] {
  return q.trim().split(/\s+/).filter(Boolean).slice(0, 5);
}
