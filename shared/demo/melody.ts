/**
 * "Harbour Lights": an original 12-bar tune in D major at 96 beats per minute, written for coilcue's
 * demo (no third-party music). Times are in beats; pitches are MIDI note numbers (60 = middle C).
 *
 * Form: bars 1–4 statement (mp), bars 5–8 crescendo to the climax (ff), bars 9–10 a quiet passage
 * (pp, melody alone), bars 11–12 return and a held final note.
 */

/** Tempo, beats per minute: one beat lasts 60/96 = 0.625 s. */
export const HARBOUR_BPM = 96;
/** Length of the tune in bars (12 × 4 beats × 0.625 s = 30 s). */
export const HARBOUR_BARS = 12;
/** 4/4 time. */
export const BEATS_PER_BAR = 4;

/** A note: onset (beats from the start), length (beats), MIDI pitch. */
export type Note = readonly [onsetBeats: number, lengthBeats: number, midi: number];

/** Melody as [pitch, length in beats] per bar; pitch 0 is a rest. */
const MELODY_BARS: readonly (readonly (readonly [number, number])[])[] = [
  [[69, 1], [66, 0.5], [67, 0.5], [69, 1], [74, 1]],
  [[73, 1.5], [71, 0.5], [69, 2]],
  [[71, 1], [67, 0.5], [69, 0.5], [71, 1], [76, 1]],
  [[74, 1.5], [73, 0.5], [74, 2]],
  [[78, 1], [76, 0.5], [74, 0.5], [73, 1], [69, 1]],
  [[71, 1], [73, 0.5], [74, 0.5], [76, 2]],
  [[78, 1], [79, 0.5], [78, 0.5], [76, 1], [74, 1]],
  [[76, 3], [0, 1]],
  [[69, 2], [66, 2]],
  [[67, 1], [64, 1], [62, 2]],
  [[69, 1], [74, 1], [78, 1], [76, 1]],
  [[74, 4]],
];

/** Chord per bar (close voicing around the third octave). D, A, G, D | Bm, G, D, A | D, G | G, D. */
const CHORDS: readonly (readonly number[])[] = [
  [50, 54, 57], [49, 52, 57], [50, 55, 59], [50, 54, 57],
  [50, 54, 59], [50, 55, 59], [50, 54, 57], [49, 52, 57],
  [50, 54, 57], [50, 55, 59],
  [50, 55, 59], [50, 54, 57],
];

/** Bass root per bar (octaves 1–2: 31 = G1 49 Hz … 38 = D2 73 Hz); played on beats 1 and 3. */
const BASS: readonly number[] = [38, 33, 31, 38, 35, 31, 38, 33, 38, 31, 31, 38];

/** Melody notes of bars [0, 12), each shifted by `transpose` semitones. @example melodyNotes()[0] // [0, 1, 69]: A4 for one beat */
export function melodyNotes(transpose = 0): Note[] {
  const out: Note[] = [];
  MELODY_BARS.forEach((bar, b) => {
    let t = b * BEATS_PER_BAR;
    for (const [m, len] of bar) {
      if (m > 0) out.push([t, len, m + transpose]);
      t += len;
    }
  });
  return out;
}

/** Pad chord tones, one whole-bar note each. @example chordNotes()[0] // [0, 4, 50]: D3 for the first bar */
export function chordNotes(transpose = 0): Note[] {
  return CHORDS.flatMap((ch, b) => ch.map((m): Note => [b * BEATS_PER_BAR, BEATS_PER_BAR, m + transpose]));
}

/** Bass notes: half notes on beats 1 and 3, silent in the quiet bars 9–10. @example bassNotes()[0] // [0, 2, 38]: D2 */
export function bassNotes(transpose = 0): Note[] {
  const out: Note[] = [];
  BASS.forEach((m, b) => {
    if (b === 8 || b === 9) return;
    out.push([b * BEATS_PER_BAR, 2, m + transpose], [b * BEATS_PER_BAR + 2, 2, m + transpose]);
  });
  return out;
}

/**
 * Loudness curve (linear gain, 1 = climax) at beat t: 0.35 in bars 1–4, rising linearly across bars
 * 5–7 to 1 in bar 8 (the climax), 0.1 (−20 dB) in bars 9–10, 0.5 in bars 11–12.
 * @example dynamicsAt(28) // 1 (bar 8)
 */
export function dynamicsAt(beat: number): number {
  const bar = beat / BEATS_PER_BAR;
  if (bar < 4) return 0.35;
  if (bar < 7) return 0.35 + (0.65 * (bar - 4)) / 3;
  if (bar < 8) return 1;
  if (bar < 10) return 0.1;
  return 0.5;
}
