import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { NpyError, decodeNpy, encodeNpy, npyHeader, readNpyHeader, type NpyDtype, type NpyTypedArray } from '../../engine/io/npy.ts';

// Format facts checked here come from the format description in NumPy's numpy/lib/format.py,
// section "Format Version 1.0" (read from the numpy 1.24 sources installed by Debian):
// magic "\x93NUMPY", bytes 6–7 the version (1, 0), bytes 8–9 HEADER_LEN as little-endian uint16,
// header terminated by '\n' and padded with spaces so that 6 + 2 + 2 + HEADER_LEN is evenly
// divisible by 64.

const CTOR: Record<NpyDtype, new (n: number) => NpyTypedArray> = {
  '<f4': Float32Array,
  '<f8': Float64Array,
  '<i4': Int32Array,
  '<u1': Uint8Array,
  '<u4': Uint32Array,
};

function filled(dtype: NpyDtype, n: number): NpyTypedArray {
  const a = new CTOR[dtype](n);
  for (let i = 0; i < n; i++) a[i] = dtype === '<f4' || dtype === '<f8' ? (i * 37 % 101) / 7 - 3 : (i * 37) % 251;
  return a;
}

function headerText(h: Uint8Array): string {
  return String.fromCharCode(...h.subarray(10));
}

const SHAPES: number[][] = [[], [0], [1], [7], [0, 3], [0, 10, 3], [3, 0], [2, 3], [4, 5, 3], [2, 1, 3, 2]];

describe('NPY 1.0 header (numpy/lib/format.py, "Format Version 1.0")', () => {
  for (const dtype of Object.keys(CTOR) as NpyDtype[]) {
    for (const shape of SHAPES) {
      it(`${dtype} ${JSON.stringify(shape)}: magic, version, length, 64-byte total, '\\n' end`, () => {
        const h = npyHeader(dtype, shape);
        expect([...h.subarray(0, 6)]).toEqual([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]);
        expect([h[6], h[7]]).toEqual([1, 0]);
        expect(h[8] | (h[9] << 8)).toBe(h.length - 10);
        expect(h.length % 64).toBe(0);
        expect(h[h.length - 1]).toBe(0x0a);
        // Padding is spaces between the dict and the newline.
        expect(headerText(h)).toMatch(/^\{.*\} *\n$/);
      });
    }
  }

  it('writes the dict the way NumPy does, shape as a Python tuple', () => {
    // Expected text as numpy.save writes it (numpy 1.24 _write_array_header: repr of the dict
    // with keys sorted, then ' ' padding and '\n'); checked byte for byte against numpy itself
    // in npyNumpy.test.ts.
    expect(headerText(npyHeader('<f4', [2, 3])).trimEnd()).toBe("{'descr': '<f4', 'fortran_order': False, 'shape': (2, 3), }");
    expect(headerText(npyHeader('<i4', [5])).trimEnd()).toBe("{'descr': '<i4', 'fortran_order': False, 'shape': (5,), }");
    expect(headerText(npyHeader('<f8', [])).trimEnd()).toBe("{'descr': '<f8', 'fortran_order': False, 'shape': (), }");
  });

  it('pads to a forced length so a header can be rewritten in place', () => {
    const big = npyHeader('<f4', [123456789, 10000, 3]);
    const small = npyHeader('<f4', [3, 10000, 3], big.length);
    expect(small.length).toBe(big.length);
    expect(readNpyHeader(small).shape).toEqual([3, 10000, 3]);
    expect(() => npyHeader('<f4', [3], 100)).toThrow(/multiple of 64/);
    expect(() => npyHeader('<f4', new Array(20).fill(123456789), 64)).toThrow(/needs \d+ bytes/);
    expect(() => npyHeader('<f4', [-1])).toThrow(NpyError);
    expect(() => npyHeader('<f4', [1.5])).toThrow(NpyError);
  });
});

describe('encodeNpy / decodeNpy round trip', () => {
  for (const dtype of Object.keys(CTOR) as NpyDtype[]) {
    for (const shape of SHAPES) {
      it(`${dtype} ${JSON.stringify(shape)}`, () => {
        const n = shape.reduce((a, b) => a * b, 1);
        const data = filled(dtype, n);
        const file = encodeNpy(data, shape);
        expect(file.length).toBe(npyHeader(dtype, shape).length + data.byteLength);
        const back = decodeNpy(file, 't.npy');
        expect(back.dtype).toBe(dtype);
        expect(back.shape).toEqual(shape);
        expect(back.data).toBeInstanceOf(data.constructor);
        expect(Array.from(back.data)).toEqual(Array.from(data));
      });
    }
  }

  it('round-trips arbitrary float32 and int32 arrays bit for bit (property)', () => {
    fc.assert(
      fc.property(fc.array(fc.float({ noNaN: false }), { maxLength: 200 }), (values) => {
        const a = Float32Array.from(values);
        const back = decodeNpy(encodeNpy(a, [a.length])).data;
        expect(new Uint32Array(back.buffer, back.byteOffset, back.length)).toEqual(new Uint32Array(a.buffer));
      }),
    );
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 }), { maxLength: 200 }), (values) => {
        const a = Int32Array.from(values);
        expect(Array.from(decodeNpy(encodeNpy(a, [a.length])).data)).toEqual(values);
      }),
    );
  });

  it('rejects a shape that does not match the data', () => {
    expect(() => encodeNpy(new Float32Array(6), [2, 2])).toThrow(/holds 4 elements but the array has 6/);
  });
});

describe('decodeNpy without copying', () => {
  it('returns a view over the given buffer when aligned', () => {
    const file = encodeNpy(filled('<f4', 30), [10, 3]);
    const back = decodeNpy(file);
    expect(back.data.buffer).toBe(file.buffer);
    // Writing through the view changes the file bytes: it really is the same memory.
    back.data[0] = 42;
    expect(new Float32Array(file.buffer, npyHeader('<f4', [10, 3]).length, 1)[0]).toBe(42);
  });

  it('views an ArrayBuffer directly, and a Uint8Array at an aligned offset inside a larger buffer', () => {
    const file = encodeNpy(filled('<f8', 12), [4, 3]);
    const ab = file.buffer.slice(0) as ArrayBuffer;
    expect(decodeNpy(ab).data.buffer).toBe(ab);
    const big = new Uint8Array(file.length + 16);
    big.set(file, 8);
    const inner = big.subarray(8, 8 + file.length);
    const back = decodeNpy(inner);
    expect(back.data.buffer).toBe(big.buffer);
    expect(Array.from(back.data)).toEqual(Array.from(filled('<f8', 12)));
  });

  it('copies when the data would be misaligned, and still decodes correctly', () => {
    const file = encodeNpy(filled('<f4', 9), [3, 3]);
    const big = new Uint8Array(file.length + 1);
    big.set(file, 1);
    const back = decodeNpy(big.subarray(1));
    expect(back.data.buffer).not.toBe(big.buffer);
    expect(Array.from(back.data)).toEqual(Array.from(filled('<f4', 9)));
  });
});

describe('decodeNpy errors', () => {
  it('says clearly when a file is shorter than its header says', () => {
    const file = encodeNpy(new Float32Array(500 * 4 * 3), [500, 4, 3]);
    const cut = file.subarray(0, npyHeader('<f4', [500, 4, 3]).length + 1234);
    expect(() => decodeNpy(cut, 'frames.npy')).toThrow(NpyError);
    expect(() => decodeNpy(cut, 'frames.npy')).toThrow(
      'frames.npy is truncated: header says 500×4×3 float32 (24000 bytes) but only 1234 bytes of data',
    );
    // A header that would need 60 MB: the message reports the full size.
    const h = npyHeader('<f4', [500, 10000, 3]);
    const tiny = new Uint8Array(h.length + 1234);
    tiny.set(h);
    expect(() => decodeNpy(tiny, 'frames.npy')).toThrow(
      'frames.npy is truncated: header says 500×10000×3 float32 (60000000 bytes) but only 1234 bytes of data',
    );
  });

  it('says when the header itself is cut off', () => {
    const file = encodeNpy(new Float32Array(3), [3]);
    const need = npyHeader('<f4', [3]).length;
    expect(() => decodeNpy(file.subarray(0, 40), 'x.npy')).toThrow(`x.npy is truncated: its header needs ${need} bytes but the file has only 40`);
  });

  it('rejects bad magic', () => {
    const file = encodeNpy(new Float32Array(3), [3]);
    file[1] = 0x41;
    expect(() => decodeNpy(file, 'x.npy')).toThrow(/x\.npy is not an NPY file/);
    expect(() => decodeNpy(new TextEncoder().encode('a,b\n1,2\n'), 'x.npy')).toThrow(/not an NPY file/);
    expect(() => decodeNpy(new Uint8Array(0), 'x.npy')).toThrow(/not an NPY file/);
  });

  it('rejects other versions, dtypes and Fortran order', () => {
    const file = encodeNpy(new Float32Array(3), [3]);
    const v2 = file.slice();
    v2[6] = 2;
    expect(() => decodeNpy(v2, 'x.npy')).toThrow('x.npy is NPY format version 2.0; only version 1.0 is supported');

    const withHeader = (dict: string) => {
      const len = Math.ceil((10 + dict.length + 1) / 64) * 64;
      const b = new Uint8Array(len + 64);
      b.set(npyHeader('<f4', [1]).subarray(0, 8));
      b[8] = (len - 10) & 0xff;
      b[9] = (len - 10) >> 8;
      for (let i = 0; i < dict.length; i++) b[10 + i] = dict.charCodeAt(i);
      b.fill(0x20, 10 + dict.length, len - 1);
      b[len - 1] = 0x0a;
      return b;
    };
    expect(() => decodeNpy(withHeader("{'descr': '>f4', 'fortran_order': False, 'shape': (3,), }"), 'x.npy')).toThrow(
      /dtype '>f4'; only/,
    );
    expect(() => decodeNpy(withHeader("{'descr': '<i8', 'fortran_order': False, 'shape': (3,), }"), 'x.npy')).toThrow(/dtype '<i8'/);
    expect(() => decodeNpy(withHeader("{'descr': '<f4', 'fortran_order': True, 'shape': (3,), }"), 'x.npy')).toThrow(/Fortran/);
    expect(() => decodeNpy(withHeader("{'descr': [('a', '<f4')], 'fortran_order': False, 'shape': (3,), }"), 'x.npy')).toThrow(
      /structured dtype/,
    );
    expect(() => decodeNpy(withHeader("{'descr': '<f4', 'fortran_order': False, }"), 'x.npy')).toThrow(/malformed.*no 'shape'/);
    // Accepted variants: NumPy's '|u1' for bytes, and Python 2's long suffix in shapes.
    expect(decodeNpy(withHeader("{'descr': '|u1', 'fortran_order': False, 'shape': (3,), }")).dtype).toBe('<u1');
    expect(decodeNpy(withHeader("{'descr': '<f4', 'fortran_order': False, 'shape': (2L, 1L), }")).shape).toEqual([2, 1]);
  });
});
