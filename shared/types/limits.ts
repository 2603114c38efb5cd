// Bounds shared by the schemas. Integer ids and counters are PostgreSQL `integer` (int4) columns: a larger value
// is refused at the boundary with a 400 naming the field, instead of failing in the database.
export const INT4_MAX = 2_147_483_647

// Unicode bidirectional controls (embeddings, overrides, isolates, marks). In a name they can make text shown
// after it (a report line, a CSV cell) read backwards; names are plain labels, so they are removed on input.
const BIDI_CONTROLS = /[\u061C\u200E\u200F\u202A-\u202E\u2066-\u2069]/g

export function stripBidiControls(text: string): string {
  return text.replace(BIDI_CONTROLS, '')
}
