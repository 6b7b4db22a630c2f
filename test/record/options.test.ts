// Recording options, codec levels and the frame schedule: the pure parts of the recorder that
// the command line and the record dialog share.
import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { parseSize, frameCount, outputKind, parseOverlays, checkVideoOptions, RecordOptionError, OVERLAYS, type VideoOptions } from '../../viewer/record/recordOptions.ts';
import { chooseVideoCodec, avcLevel, vp9Level, videoBitrate } from '../../viewer/record/videoCodec.ts';
import { runFraction, cameraFraction, timestampUs } from '../../viewer/record/frameSchedule.ts';
import { parseCameraPath, formatCameraPath } from '../../viewer/record/cameraPath.ts';

const video = (o: Partial<VideoOptions> = {}): VideoOptions => ({
  width: 1920, height: 1080, fps: 30, seconds: 10, container: 'mp4', camera: { kind: 'still', preset: 'oblique' }, overlays: [...OVERLAYS], title: 't', ...o,
});

describe('sizes, rates and lengths', () => {
  it('reads WxH and refuses sizes outside 16–7680, and odd sides for video', () => {
    expect(parseSize('1920x1080', true)).toEqual({ width: 1920, height: 1080 });
    expect(parseSize('320×240', true)).toEqual({ width: 320, height: 240 });
    expect(parseSize('321x241', false)).toEqual({ width: 321, height: 241 });
    for (const bad of ['0x0', '99999x99999', '15x100', '7682x100', '1920', '1920x', 'axb', '-2x4']) {
      expect(() => parseSize(bad, true), bad).toThrow(RecordOptionError);
    }
    expect(() => parseSize('321x240', true)).toThrow(/even width/);
    expect(() => parseSize('320x241', true)).toThrow(/even height/);
  });

  it('a video holds fps × seconds frames, which must be whole', () => {
    expect(frameCount(10, 2)).toBe(20);
    expect(frameCount(30, 0.5)).toBe(15);
    expect(frameCount(24, 1 / 3)).toBe(8); // 1/3 s is not exact in binary; the product is, to rounding
    expect(() => frameCount(30, 0.51)).toThrow(/whole number of frames/);
    expect(() => frameCount(30, -1)).toThrow(/--seconds must be more than 0/);
    expect(() => frameCount(30, 0)).toThrow(/--seconds/);
    expect(() => frameCount(0, 1)).toThrow(/--fps/);
    expect(() => frameCount(121, 1)).toThrow(/--fps/);
    expect(() => frameCount(29.97, 1)).toThrow(/--fps/);
  });

  it('the container follows the extension', () => {
    expect(outputKind('talk.mp4')).toBe('mp4');
    expect(outputKind('/a/b/TALK.MP4')).toBe('mp4');
    expect(outputKind('x.webm')).toBe('webm');
    expect(outputKind('fig.png')).toBe('png');
    expect(outputKind('x.avi')).toBeNull();
    expect(outputKind('mp4')).toBeNull();
  });

  it('overlays: a list, all or none; unknown names refused', () => {
    expect(parseOverlays('all')).toEqual([...OVERLAYS]);
    expect(parseOverlays('none')).toEqual([]);
    expect(parseOverlays('title,time,time')).toEqual(['title', 'time']);
    expect(() => parseOverlays('title,clock')).toThrow(/unknown overlay "clock"/);
  });

  it('camera paths read and write back', () => {
    for (const t of ['oblique', 'top', 'side', 'end-on', 'orbit', 'orbit:top', 'fly:top:side', 'fly:end-on:oblique']) expect(formatCameraPath(parseCameraPath(t))).toBe(t);
    expect(parseCameraPath('orbit')).toEqual({ kind: 'orbit', preset: 'oblique', turns: 1 });
    for (const bad of ['', 'front', 'orbit:front', 'fly:top', 'fly:top:top', 'fly:a:b:c', 'spin']) expect(() => parseCameraPath(bad), bad).toThrow(/--camera/);
  });
});

describe('codec levels', () => {
  // Levels of common video formats from the H.264 level limits (ITU-T H.264 Table A-1:
  // MaxFS, MaxMBPS, MaxBR); the usual pairings, e.g. 720p30 → 3.1, 1080p30 → 4, 1080p60 → 4.2,
  // 2160p30 → 5.1, are common practice, no source; the table values from memory.
  it('H.264: the lowest level whose frame size, macroblock rate and bitrate hold the video', () => {
    const lv = (w: number, h: number, fps: number) => avcLevel(w, h, fps, videoBitrate(w, h, fps))?.name;
    expect(lv(1280, 720, 30)).toBe('3.1'); // 3600 MBs, 108,000 MB/s: exactly level 3.1's limits
    expect(lv(1920, 1080, 30)).toBe('4'); // 8160 MBs (1088 lines), 244,800 MB/s ≤ 245,760
    expect(lv(1920, 1080, 60)).toBe('4.2'); // 489,600 MB/s: above 4.1, within 4.2's 522,240
    expect(lv(3840, 2160, 30)).toBe('5.1'); // 32,400 MBs: above 5's 22,080
    expect(lv(3840, 2160, 60)).toBe('5.2');
    expect(lv(7680, 4320, 30)).toBe('6');
    // a 7680 × 7680 frame is 230,400 macroblocks, beyond the largest level's 139,264
    expect(lv(7680, 7680, 30)).toBeUndefined();
    // a very thin frame: 7680 / 16 = 480 MBs wide, over √(8 × 8192) = 256 at level 4
    expect(avcLevel(7680, 16, 1, 1e6)!.idc).toBeGreaterThanOrEqual(50);
    expect(chooseVideoCodec('mp4', 1920, 1080, 30).codecString).toBe('avc1.640028');
    expect(() => chooseVideoCodec('mp4', 7680, 7680, 30)).toThrow(/H\.264 cannot hold 7680×7680.*\.webm/);
    expect(() => checkVideoOptions(video({ width: 7680, height: 7680 }))).toThrow(RecordOptionError);
  });

  // VP9 levels: WebM project, "VP9 levels and decoder testing" (luma picture size and sample
  // rate limits); 720p30 → 3.1, 1080p30 → 4, 2160p30 → 5 by those limits. From memory.
  it('VP9: the lowest level whose picture size, sample rate and bitrate hold the video', () => {
    const lv = (w: number, h: number, fps: number) => vp9Level(w, h, fps, videoBitrate(w, h, fps))?.name;
    expect(lv(1280, 720, 30)).toBe('3.1');
    expect(lv(1920, 1080, 30)).toBe('4');
    expect(lv(3840, 2160, 30)).toBe('5');
    expect(lv(7680, 4320, 30)).toBe('6');
    expect(chooseVideoCodec('webm', 1920, 1080, 30).codecString).toBe('vp09.00.40.08');
  });

  it('a key frame every two seconds, and a bitrate within 0.5–60 Mbit/s', () => {
    expect(chooseVideoCodec('mp4', 640, 360, 30).keyFrameEvery).toBe(60);
    expect(chooseVideoCodec('webm', 640, 360, 1).keyFrameEvery).toBe(2);
    fc.assert(fc.property(fc.integer({ min: 8, max: 3840 }), fc.integer({ min: 8, max: 3840 }), fc.integer({ min: 1, max: 120 }), (w, h, fps) => {
      const b = videoBitrate(2 * w, 2 * h, fps);
      return b >= 0.5e6 && b <= 60e6;
    }));
  });
});

describe('frame schedule', () => {
  it("spreads the run's whole duration over the frames: first frame the start, last the end, even steps", () => {
    fc.assert(fc.property(fc.integer({ min: 2, max: 5000 }), (n) => {
      if (runFraction(0, n) !== 0 || runFraction(n - 1, n) !== 1) return false;
      const step = runFraction(1, n) - runFraction(0, n);
      for (let i = 1; i < n; i++) if (Math.abs(runFraction(i, n) - runFraction(i - 1, n) - step) > 1e-12) return false;
      return true;
    }));
    expect(runFraction(0, 1)).toBe(1); // a one-frame video shows the end
  });

  it('an orbit turns at a constant rate and stops one step short of a full turn (it loops); a fly ends on its second view', () => {
    const orbit = { kind: 'orbit', preset: 'top', turns: 1 } as const;
    expect(cameraFraction(orbit, 0, 40)).toBe(0);
    expect(cameraFraction(orbit, 39, 40)).toBeCloseTo(39 / 40, 12);
    expect(cameraFraction({ kind: 'fly', from: 'top', to: 'side' }, 39, 40)).toBe(1);
  });

  it('timestamps are whole microseconds and the durations add up to the video exactly', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 120 }), fc.integer({ min: 1, max: 600 }), (fps, n) => {
      let sum = 0;
      for (let i = 0; i < n; i++) {
        const d = timestampUs(i + 1, fps) - timestampUs(i, fps);
        if (!Number.isInteger(timestampUs(i, fps)) || d <= 0) return false;
        sum += d;
      }
      return sum === Math.round((n * 1e6) / fps);
    }));
  });
});
