/**
 * MPEG-1/2/2.5 audio (Layer I/II/III) frame walker: sample rate, channel count, frame count and whether
 * the last frame is cut off, read from the frame headers without decoding.
 *
 * Header layout, bit-rate and sample-rate tables, frame lengths and samples per frame: ISO/IEC 11172-3
 * (1993) §2.4.2.3 and ISO/IEC 13818-3 (1998) §2.4.2.3 (lower sampling frequencies); "MPEG 2.5" is the
 * Fraunhofer extension of 13818-3 to 8/11.025/12 kHz. Tables transcribed [recalled] and checked by the
 * decoder tests (a walked duration that matches the decoded one). Xing/Info VBR header: frame count at
 * the offset after the side information (LAME technical documentation); VBRI: Fraunhofer, frames at +14.
 */

/** Bit rates in kbit/s by [version-group][layer][index]; group 0 = MPEG-1, 1 = MPEG-2/2.5. Layer index 1..3 = I..III. */
const BITRATE_KBPS: readonly (readonly (readonly number[])[])[] = [
  [
    [],
    [0, 32, 64, 96, 128, 160, 192, 224, 256, 288, 320, 352, 384, 416, 448],
    [0, 32, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320, 384],
    [0, 32, 40, 48, 56, 64, 80, 96, 112, 128, 160, 192, 224, 256, 320],
  ],
  [
    [],
    [0, 32, 48, 56, 64, 80, 96, 112, 128, 144, 160, 176, 192, 224, 256],
    [0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160],
    [0, 8, 16, 24, 32, 40, 48, 56, 64, 80, 96, 112, 128, 144, 160],
  ],
];
/** Sample rates in Hz by version bits (0 = MPEG-2.5, 2 = MPEG-2, 3 = MPEG-1) and index. */
const RATE_HZ: Record<number, readonly number[]> = { 0: [11025, 12000, 8000], 2: [22050, 24000, 16000], 3: [44100, 48000, 32000] };

/** One decoded frame header. */
export interface Mp3FrameHeader {
  /** 3 = MPEG-1, 2 = MPEG-2, 0 = MPEG-2.5 (the raw version bits). */
  versionBits: number;
  /** 1, 2 or 3 for Layer I, II, III. */
  layer: number;
  sampleRate: number;
  channelCount: 1 | 2;
  /** Frame length in bytes, header included. */
  frameBytes: number;
  /** PCM samples per channel the frame decodes to. */
  samplesPerFrame: number;
}

/**
 * Parses the 4-byte frame header at `o`, or returns null when it is not a valid, fixed-bit-rate header
 * (free-format bit rate, index 15, reserved version/layer/rate are all rejected).
 *
 * Frame length (bytes): Layer I 4·⌊12·R/fs + pad⌋; Layer II and MPEG-1 Layer III ⌊144·R/fs⌋ + pad;
 * MPEG-2/2.5 Layer III ⌊72·R/fs⌋ + pad (R in bit/s).
 * @example parseMp3Header(Uint8Array.of(0xff, 0xfb, 0x90, 0x64), 0) // MPEG-1 L3 128 kbit/s 44.1 kHz, 417 bytes
 */
export function parseMp3Header(b: Uint8Array, o: number): Mp3FrameHeader | null {
  if (o + 4 > b.length) return null;
  const b1 = b[o + 1], b2 = b[o + 2], b3 = b[o + 3];
  if (b[o] !== 0xff || (b1 & 0xe0) !== 0xe0) return null;
  const versionBits = (b1 >> 3) & 3;
  const layerBits = (b1 >> 1) & 3;
  if (versionBits === 1 || layerBits === 0) return null;
  const layer = 4 - layerBits;
  const brIndex = b2 >> 4;
  const srIndex = (b2 >> 2) & 3;
  if (brIndex === 0 || brIndex === 15 || srIndex === 3) return null;
  const pad = (b2 >> 1) & 1;
  const sampleRate = RATE_HZ[versionBits][srIndex];
  const bitRate = BITRATE_KBPS[versionBits === 3 ? 0 : 1][layer][brIndex] * 1000;
  const mpeg1 = versionBits === 3;
  let frameBytes: number, samplesPerFrame: number;
  if (layer === 1) {
    frameBytes = 4 * (Math.floor((12 * bitRate) / sampleRate) + pad);
    samplesPerFrame = 384;
  } else if (layer === 2 || mpeg1) {
    frameBytes = Math.floor((144 * bitRate) / sampleRate) + pad;
    samplesPerFrame = 1152;
  } else {
    frameBytes = Math.floor((72 * bitRate) / sampleRate) + pad;
    samplesPerFrame = 576;
  }
  return { versionBits, layer, sampleRate, channelCount: b3 >> 6 === 3 ? 1 : 2, frameBytes, samplesPerFrame };
}

const sameStream = (a: Mp3FrameHeader, b: Mp3FrameHeader): boolean =>
  a.versionBits === b.versionBits && a.layer === b.layer && a.sampleRate === b.sampleRate;

/**
 * Offset of the first frame at or after `from` whose successor frame header follows at the computed
 * length (two chained headers make a false sync in tag or junk bytes unlikely), searching at most
 * 64 KiB; −1 when there is none. A lone frame that exactly fills the rest of the file also counts.
 */
export function findFirstMp3Frame(b: Uint8Array, from: number): number {
  const end = Math.min(b.length - 4, from + 65536);
  for (let o = from; o <= end; o++) {
    if (b[o] !== 0xff) continue;
    const h = parseMp3Header(b, o);
    if (!h) continue;
    const next = o + h.frameBytes;
    if (next === b.length) return o;
    const h2 = parseMp3Header(b, next);
    if (h2 && sameStream(h, h2)) return o;
  }
  return -1;
}

/** What the frame walk found. */
export interface Mp3Probe {
  sampleRate: number;
  channelCount: 1 | 2;
  /** Audio frames (the Xing/Info/VBRI frame excluded) times samples per frame; includes encoder delay and padding. */
  frameCount: number;
  /** frameCount / sampleRate, seconds. An upper estimate: gapless decoders trim the encoder's delay and padding. */
  durationS: number;
  /** True when the last frame runs past the end of the file, or the Xing/VBRI frame count exceeds the frames present. */
  truncated: boolean;
}

/** Byte offset of the Xing/Info tag inside a Layer III frame: after the 4-byte header and the side information. */
function xingOffset(h: Mp3FrameHeader): number {
  const mono = h.channelCount === 1;
  if (h.versionBits === 3) return 4 + (mono ? 17 : 32);
  return 4 + (mono ? 9 : 17);
}

const isAscii = (b: Uint8Array, o: number, s: string): boolean => {
  if (o + s.length > b.length) return false;
  for (let i = 0; i < s.length; i++) if (b[o + i] !== s.charCodeAt(i)) return false;
  return true;
};
/** ID3v1 ("TAG", 128 bytes), APEv2 ("APETAGEX"), Lyrics3 ("LYRICS") or an appended ID3v2 tag at `o`. */
const isTrailingTag = (b: Uint8Array, o: number): boolean =>
  isAscii(b, o, 'TAG') || isAscii(b, o, 'APETAGEX') || isAscii(b, o, 'LYRICS') || isAscii(b, o, 'ID3') || b.length - o < 4;

const u32be = (b: Uint8Array, o: number): number => ((b[o] << 24) >>> 0) + (b[o + 1] << 16) + (b[o + 2] << 8) + b[o + 3];

/**
 * Walks every frame from the first one found after `start` (past any ID3v2 tag). Stops at the first
 * position that is not a frame of the same stream: a trailing ID3v1/APE/Lyrics tag, junk, or the end.
 * Returns null when no frame is found.
 * @example probeMp3(bytes, skipId3v2(bytes))?.durationS // ≈ 3.03 for a 3 s LAME file at 44.1 kHz
 */
export function probeMp3(b: Uint8Array, start: number): Mp3Probe | null {
  const first = findFirstMp3Frame(b, start);
  if (first < 0) return null;
  const h0 = parseMp3Header(b, first)!;
  let declaredFrames: number | null = null;
  let audioFrames = 0;
  let truncated = false;
  let o = first;
  // The Xing/Info or VBRI frame carries no audio: skip it and keep its declared frame count.
  if (h0.layer === 3) {
    const x = first + xingOffset(h0);
    if (isAscii(b, x, 'Xing') || isAscii(b, x, 'Info')) {
      if (x + 12 <= b.length && b[x + 7] & 1) declaredFrames = u32be(b, x + 8);
      o += h0.frameBytes;
    } else if (isAscii(b, first + 36, 'VBRI')) {
      if (first + 36 + 18 <= b.length) declaredFrames = u32be(b, first + 36 + 14);
      o += h0.frameBytes;
    }
  }
  let stoppedInJunk = false;
  while (o < b.length) {
    const h = parseMp3Header(b, o);
    if (!h && b.length - o < 4 && b[o] === 0xff) {
      truncated = true; // the file ends inside a frame header
      break;
    }
    if (!h || !sameStream(h, h0)) {
      // Not a frame of this stream: a trailing tag (fine) or junk the decoder may resync over.
      stoppedInJunk = !isTrailingTag(b, o);
      break;
    }
    if (o + h.frameBytes > b.length) {
      truncated = true;
      break;
    }
    audioFrames++;
    o += h.frameBytes;
  }
  // Fewer frames than the VBR header declares, with the walk ending cleanly at the end: frames are missing.
  if (declaredFrames !== null && declaredFrames > audioFrames && !stoppedInJunk) truncated = true;
  const frames = stoppedInJunk && declaredFrames !== null ? Math.max(declaredFrames, audioFrames) : audioFrames;
  const frameCount = frames * h0.samplesPerFrame;
  return { sampleRate: h0.sampleRate, channelCount: h0.channelCount, frameCount, durationS: frameCount / h0.sampleRate, truncated };
}
