// Which codec a recording uses, and how it is configured. The container follows the output's
// extension: MP4 holds H.264 (what slide software plays best), WebM holds VP9. The WebCodecs
// codec string names the profile and the level, and the level must allow the frame size, the
// macroblock rate and the bitrate, or the encoder refuses (or writes a stream players reject).
// Pure: usable in Node (the command line checks sizes before starting a browser) and the page.

export type Container = 'mp4' | 'webm';

export interface VideoCodecChoice {
  container: Container;
  /** the muxer's codec name */
  codec: 'avc' | 'vp9';
  /** the WebCodecs codec string, e.g. avc1.640028 */
  codecString: string;
  /** for messages: H.264, VP9 */
  label: string;
  /** what to try instead when this one cannot be encoded */
  alternative: string;
  bitrate: number;
  /** a key frame every this many frames (every 2 s), so players can seek */
  keyFrameEvery: number;
}

/** Chooses and configures the codec for a container and frame size; throws an Error with a
 *  one-line message when the codec's levels cannot hold the video at all. */
export function chooseVideoCodec(container: Container, width: number, height: number, fps: number): VideoCodecChoice {
  const bitrate = videoBitrate(width, height, fps);
  const keyFrameEvery = Math.max(1, Math.round(2 * fps));
  if (container === 'mp4') {
    const level = avcLevel(width, height, fps, bitrate);
    if (!level) {
      throw new Error(`H.264 cannot hold ${width}×${height} at ${fps} fps (its largest level allows ${AVC_LEVELS.at(-1)!.maxFs.toLocaleString('en-US')} macroblocks a frame); write a .webm (VP9) instead, or choose a smaller --size`);
    }
    // High profile (profile_idc 100), no constraint flags, then level_idc, all as hex
    return { container, codec: 'avc', codecString: `avc1.6400${hex(level.idc)}`, label: 'H.264', alternative: 'write a .webm (VP9) instead', bitrate, keyFrameEvery };
  }
  const level = vp9Level(width, height, fps, bitrate);
  if (!level) throw new Error(`VP9 cannot hold ${width}×${height} at ${fps} fps; choose a smaller --size or a lower --fps`);
  // profile 0 (8-bit 4:2:0), level as two digits, bit depth 8
  return { container, codec: 'vp9', codecString: `vp09.00.${String(level.idc).padStart(2, '0')}.08`, label: 'VP9', alternative: 'write an .mp4 (H.264) instead', bitrate, keyFrameEvery };
}

/** Bits per second for sharp lines on a dark ground: 0.15 bit per pixel per frame, within
 *  0.5–60 Mbit/s (1920×1080 at 30 fps: 9.3 Mbit/s). Our choice, tuned by eye on stills. */
export function videoBitrate(width: number, height: number, fps: number): number {
  return Math.round(Math.min(60e6, Math.max(0.5e6, width * height * fps * 0.15)));
}

export interface CodecLevel {
  /** level_idc as the bitstream writes it (H.264: 10 × level; VP9: 10 × level) */
  idc: number;
  name: string;
  /** largest frame, macroblocks (H.264) or luma samples (VP9) */
  maxFs: number;
  /** largest rate, macroblocks (H.264) or luma samples (VP9) per second */
  maxRate: number;
  /** largest bitrate, bit/s */
  maxBitrate: number;
}

// H.264 levels, ITU-T H.264 Table A-1 (MaxMBPS, MaxFS, MaxBR for Baseline/Main/Extended;
// High allows 1.25 × MaxBR, not used so the choice is conservative). From memory; the frame
// sizes and bitrates agree with the table mediabunny ships (its codec.js AVC_LEVEL_TABLE).
export const AVC_LEVELS: readonly CodecLevel[] = [
  { idc: 10, name: '1', maxRate: 1485, maxFs: 99, maxBitrate: 64e3 },
  { idc: 11, name: '1.1', maxRate: 3000, maxFs: 396, maxBitrate: 192e3 },
  { idc: 12, name: '1.2', maxRate: 6000, maxFs: 396, maxBitrate: 384e3 },
  { idc: 13, name: '1.3', maxRate: 11880, maxFs: 396, maxBitrate: 768e3 },
  { idc: 20, name: '2', maxRate: 11880, maxFs: 396, maxBitrate: 2e6 },
  { idc: 21, name: '2.1', maxRate: 19800, maxFs: 792, maxBitrate: 4e6 },
  { idc: 22, name: '2.2', maxRate: 20250, maxFs: 1620, maxBitrate: 4e6 },
  { idc: 30, name: '3', maxRate: 40500, maxFs: 1620, maxBitrate: 10e6 },
  { idc: 31, name: '3.1', maxRate: 108000, maxFs: 3600, maxBitrate: 14e6 },
  { idc: 32, name: '3.2', maxRate: 216000, maxFs: 5120, maxBitrate: 20e6 },
  { idc: 40, name: '4', maxRate: 245760, maxFs: 8192, maxBitrate: 20e6 },
  { idc: 41, name: '4.1', maxRate: 245760, maxFs: 8192, maxBitrate: 50e6 },
  { idc: 42, name: '4.2', maxRate: 522240, maxFs: 8704, maxBitrate: 50e6 },
  { idc: 50, name: '5', maxRate: 589824, maxFs: 22080, maxBitrate: 135e6 },
  { idc: 51, name: '5.1', maxRate: 983040, maxFs: 36864, maxBitrate: 240e6 },
  { idc: 52, name: '5.2', maxRate: 2073600, maxFs: 36864, maxBitrate: 240e6 },
  { idc: 60, name: '6', maxRate: 4177920, maxFs: 139264, maxBitrate: 240e6 },
  { idc: 61, name: '6.1', maxRate: 8355840, maxFs: 139264, maxBitrate: 480e6 },
  { idc: 62, name: '6.2', maxRate: 16711680, maxFs: 139264, maxBitrate: 800e6 },
];

// VP9 levels, WebM project "VP9 Levels and Decoder Testing" table (max luma sample rate, max
// luma picture size, max bitrate). From memory; sizes and bitrates agree with mediabunny's
// VP9_LEVEL_TABLE.
export const VP9_LEVELS: readonly CodecLevel[] = [
  { idc: 10, name: '1', maxRate: 829440, maxFs: 36864, maxBitrate: 200e3 },
  { idc: 11, name: '1.1', maxRate: 2764800, maxFs: 73728, maxBitrate: 800e3 },
  { idc: 20, name: '2', maxRate: 4608000, maxFs: 122880, maxBitrate: 1.8e6 },
  { idc: 21, name: '2.1', maxRate: 9216000, maxFs: 245760, maxBitrate: 3.6e6 },
  { idc: 30, name: '3', maxRate: 20736000, maxFs: 552960, maxBitrate: 7.2e6 },
  { idc: 31, name: '3.1', maxRate: 36864000, maxFs: 983040, maxBitrate: 12e6 },
  { idc: 40, name: '4', maxRate: 83558400, maxFs: 2228224, maxBitrate: 18e6 },
  { idc: 41, name: '4.1', maxRate: 160432128, maxFs: 2228224, maxBitrate: 30e6 },
  { idc: 50, name: '5', maxRate: 311951360, maxFs: 8912896, maxBitrate: 60e6 },
  { idc: 51, name: '5.1', maxRate: 588251136, maxFs: 8912896, maxBitrate: 120e6 },
  { idc: 52, name: '5.2', maxRate: 1176502272, maxFs: 8912896, maxBitrate: 180e6 },
  { idc: 60, name: '6', maxRate: 1176502272, maxFs: 35651584, maxBitrate: 180e6 },
  { idc: 61, name: '6.1', maxRate: 2353004544, maxFs: 35651584, maxBitrate: 240e6 },
  { idc: 62, name: '6.2', maxRate: 4706009088, maxFs: 35651584, maxBitrate: 480e6 },
];

/** The lowest H.264 level that holds the video, or null. Besides the frame's macroblock count,
 *  each side may be at most √(8·MaxFS) macroblocks (H.264 A.3.1, items on PicWidthInMbs and
 *  FrameHeightInMbs), which rules out very thin frames. */
export function avcLevel(width: number, height: number, fps: number, bitrate: number): CodecLevel | null {
  const mbw = Math.ceil(width / 16), mbh = Math.ceil(height / 16), fs = mbw * mbh;
  return AVC_LEVELS.find((l) => fs <= l.maxFs && fs * fps <= l.maxRate && bitrate <= l.maxBitrate
    && mbw <= Math.sqrt(8 * l.maxFs) && mbh <= Math.sqrt(8 * l.maxFs)) ?? null;
}

/** The lowest VP9 level that holds the video, or null. */
export function vp9Level(width: number, height: number, fps: number, bitrate: number): CodecLevel | null {
  const fs = width * height;
  return VP9_LEVELS.find((l) => fs <= l.maxFs && fs * fps <= l.maxRate && bitrate <= l.maxBitrate) ?? null;
}

function hex(n: number): string {
  return n.toString(16).padStart(2, '0');
}
