#!/usr/bin/python3
"""Crafted micrographs for the reader's robustness test (crafted.test.ts):
tile layouts where the tile is larger than the image, LZW written by an
encoder of our own (TIFF 6.0 specification, section 13) and then damaged,
wrong SamplesPerPixel, huge declared sizes. Each file is listed in
manifest.json with either the values a reader must return (numpy arrays,
each such file also read back with Debian's python3-pil / libtiff as an
independent check) or "error": a phrase the refusal must contain.

    /usr/bin/python3 test/imageio/craft_micrographs.py OUTDIR
"""
import json
import os
import struct
import sys
import zlib

import numpy as np
from PIL import Image

OUT = sys.argv[1]
rng = np.random.default_rng(424242)
manifest = []


def path(name):
    return os.path.join(OUT, name)


def add_ok(name, arr, pil_check=True):
    if pil_check:
        back = np.asarray(Image.open(path(name)))
        assert back.shape == arr.shape and np.array_equal(back, arr), name
    manifest.append({"file": name, "width": int(arr.shape[1]), "height": int(arr.shape[0]),
                     "expected": [float(v) for v in arr.astype(np.float64).ravel()]})


def add_error(name, part):
    manifest.append({"file": name, "error": part})


# ------------------------------------------------------------ LZW encoder
def lzw_width(dec_next):
    """Code width the TIFF decoder uses when its next free code is dec_next (early change)."""
    return 9 if dec_next < 511 else 10 if dec_next < 1023 else 11 if dec_next < 2047 else 12


def lzw_encode(data):
    """TIFF LZW (TIFF 6.0, section 13): MSB-first codes, Clear 256, EOI 257."""
    bits = []

    def put(code, width):
        bits.extend((code >> (width - 1 - k)) & 1 for k in range(width))

    k = 0  # codes written since the last Clear (the decoder adds an entry from the 2nd on)

    def put_code(code):
        nonlocal k
        k += 1
        put(code, lzw_width(258 + max(0, k - 2)))

    put(256, 9)
    table = {bytes([i]): i for i in range(256)}
    nxt = 258
    w = b""
    for c in data:
        wc = w + bytes([c])
        if wc in table:
            w = wc
            continue
        put_code(table[w])
        table[wc] = nxt
        nxt += 1
        w = bytes([c])
        if nxt == 4094:
            put(256, lzw_width(258 + max(0, k + 1 - 2)))
            k = 0
            table = {bytes([i]): i for i in range(256)}
            nxt = 258
    if w:
        put_code(table[w])
    put_code(257)
    while len(bits) % 8:
        bits.append(0)
    return bytes(int("".join(map(str, bits[i:i + 8])), 2) for i in range(0, len(bits), 8))


# ------------------------------------------------------------ TIFF writer (TIFF 6.0, sections 2, 3, 15)
def write_tiff(name, w, h, blocks, bps=8, spp=1, photometric=1, compression=1, tile=None,
               rows_per_strip=None, be=False, extra=None, sample_format=1, counts=None):
    e = ">" if be else "<"
    n = len(blocks)
    fields = [(256, 4, [w]), (257, 4, [h]), (258, 3, [bps] * spp), (259, 3, [compression]),
              (262, 3, [photometric]), (277, 3, [spp]), (339, 3, [sample_format] * spp)]
    if tile:
        fields += [(322, 4, [tile[0]]), (323, 4, [tile[1]]), (324, 4, None), (325, 4, counts or [len(b) for b in blocks])]
    else:
        fields += [(273, 4, None), (278, 4, [rows_per_strip or h]), (279, 4, counts or [len(b) for b in blocks])]
    if extra:
        fields += extra
    fields.sort(key=lambda f: f[0])
    ifd_size = 2 + 12 * len(fields) + 4
    heap = bytearray()
    heap_at = 8 + ifd_size
    size = {3: 2, 4: 4}
    # place out-of-line values, then the pixel data
    entries = []
    offs_pos = None
    for tag, typ, vals in fields:
        if vals is None:
            vals = [0] * n
        raw = b"".join(struct.pack(e + ("H" if typ == 3 else "I"), v) for v in vals)
        if len(raw) <= 4:
            entries.append((tag, typ, len(vals), raw.ljust(4, b"\0"), None))
        else:
            at = heap_at + len(heap)
            if tag in (273, 324):
                offs_pos = len(heap)
            heap += raw
            entries.append((tag, typ, len(vals), struct.pack(e + "I", at), None))
    data_at = heap_at + len(heap)
    offsets, o = [], data_at
    for b in blocks:
        offsets.append(o)
        o += len(b)
    fmt = e + "I"
    if offs_pos is not None:
        for i, v in enumerate(offsets):
            struct.pack_into(fmt, heap, offs_pos + 4 * i, v)
    else:  # a single offset stored in the entry
        entries = [(t, ty, c, struct.pack(fmt, offsets[0]) if t in (273, 324) else v, x) for t, ty, c, v, x in entries]
    buf = bytearray((b"MM\0*" if be else b"II*\0") + struct.pack(fmt, 8) + struct.pack(e + "H", len(entries)))
    for tag, typ, count, val, _ in entries:
        buf += struct.pack(e + "HHI", tag, typ, count) + val
    buf += struct.pack(fmt, 0) + heap + b"".join(blocks)
    open(path(name), "wb").write(buf)


def tiles_of(arr, tw, tl, dtype):
    h, w = arr.shape
    out = []
    for y in range(0, h, tl):
        for x in range(0, w, tw):
            block = np.zeros((tl, tw), dtype=dtype)
            part = arr[y:y + tl, x:x + tw]
            block[:part.shape[0], :part.shape[1]] = part
            out.append(block.tobytes())
    return out


img200 = rng.integers(0, 256, size=(200, 200), dtype=np.uint8)
# gradients compress well, so LZW codes reach 10-12 bits and a table reset
smooth = ((np.add.outer(np.arange(200), np.arange(200)) // 3) % 256).astype(np.uint8)

# ---- tile layouts: one 256 x 256 tile holding a 200 x 200 image (TIFF 6.0, section 15)
write_tiff("tile256_of_200_raw.tif", 200, 200, tiles_of(img200, 256, 256, np.uint8), tile=(256, 256))
add_ok("tile256_of_200_raw.tif", img200)
write_tiff("tile256_of_200_lzw.tif", 200, 200, [lzw_encode(t) for t in tiles_of(img200, 256, 256, np.uint8)],
           compression=5, tile=(256, 256))
add_ok("tile256_of_200_lzw.tif", img200)
write_tiff("tile256_of_200_deflate.tif", 200, 200, [zlib.compress(t) for t in tiles_of(smooth, 256, 256, np.uint8)],
           compression=8, tile=(256, 256))
add_ok("tile256_of_200_deflate.tif", smooth)
# several tiles, edge tiles partly outside, 16-bit big-endian, LZW
g16 = rng.integers(0, 65536, size=(37, 40), dtype=np.uint16)
write_tiff("tiles16_be_lzw.tif", 40, 37, [lzw_encode(t) for t in tiles_of(g16, 16, 16, ">u2")],
           bps=16, compression=5, tile=(16, 16), be=True)
add_ok("tiles16_be_lzw.tif", g16)
# strips of LZW written by our encoder, long enough for the code width to reach 12 bits and a Clear
big = np.tile(smooth, (3, 3))[:512, :512].copy()
big[::7, ::5] = rng.integers(0, 256, size=big[::7, ::5].shape, dtype=np.uint8)
write_tiff("strips_lzw_own.tif", 512, 512, [lzw_encode(big[y:y + 128].tobytes()) for y in range(0, 512, 128)],
           compression=5, rows_per_strip=128)
add_ok("strips_lzw_own.tif", big)

# ---- tile geometry that does not add up
# a tile byte count that does not match 256 x 256 bytes
write_tiff("tile_count_wrong.tif", 200, 200, [img200.tobytes()], tile=(256, 256))
add_error("tile_count_wrong.tif", "tile 0 holds 40000 bytes")
# too few tiles for the image
write_tiff("tiles_missing.tif", 40, 37, tiles_of(g16, 16, 16, "<u2")[:3], bps=16, tile=(16, 16))
add_error("tiles_missing.tif", "the image needs 9 tiles but the file locates 3")
# tile size 0
write_tiff("tile_zero.tif", 40, 37, tiles_of(g16, 16, 16, "<u2"), bps=16, tile=(0, 16))
add_error("tile_zero.tif", "the tile size is 0")

# ---- damaged LZW (each strip of strips_lzw_own.tif damaged differently)
good = [lzw_encode(big[y:y + 128].tobytes()) for y in range(0, 512, 128)]
cases = {
    "lzw_truncated.tif": [good[0][: len(good[0]) // 2]] + good[1:],
    "lzw_all_ff.tif": [b"\xff" * len(good[0])] + good[1:],
    "lzw_only_clear.tif": [bytes([0x80, 0x40, 0x20, 0x10, 0x08, 0x04, 0x02, 0x01]) * 4000] + good[1:],
    "lzw_zeros.tif": [b"\x80" + b"\x00" * 5000] + good[1:],
    "lzw_old_style.tif": [b"\x00\x01" + good[0][2:]] + good[1:],
}
for name, strips in cases.items():
    write_tiff(name, 512, 512, strips, compression=5, rows_per_strip=128)
    add_error(name, "damaged or truncated TIFF")
# random byte damage: cannot always be detected (LZW has no checksum); the test checks
# that each is refused or decodes without hanging, and counts the outcomes
for s in range(40):
    r = np.random.default_rng(1000 + s)
    strip = bytearray(good[1])
    for _ in range(1 + s % 4):
        strip[int(r.integers(2, len(strip)))] = int(r.integers(0, 256))
    write_tiff(f"lzw_random_{s:02d}.tif", 512, 512, [good[0], bytes(strip)] + good[2:], compression=5, rows_per_strip=128)
    manifest.append({"file": f"lzw_random_{s:02d}.tif", "damaged": True})

# ---- wrong SamplesPerPixel
rgb = rng.integers(0, 256, size=(50, 60, 3), dtype=np.uint8)
grey = rng.integers(0, 256, size=(50, 60), dtype=np.uint8)
write_tiff("spp3_on_grey_raw.tif", 60, 50, [grey.tobytes()], spp=3, photometric=1)
add_error("spp3_on_grey_raw.tif", "3 samples per pixel but 0 declared extra sample(s)")
write_tiff("spp3_rgb_on_grey_raw.tif", 60, 50, [grey.tobytes()], spp=3, photometric=2)
add_error("spp3_rgb_on_grey_raw.tif", "strip 0 holds 3000 bytes")
write_tiff("spp3_rgb_on_grey_lzw.tif", 60, 50, [lzw_encode(grey.tobytes())], spp=3, photometric=2, compression=5)
add_error("spp3_rgb_on_grey_lzw.tif", "decompresses to 3000 bytes where 9000 are needed")
write_tiff("spp1_on_rgb_lzw.tif", 60, 50, [lzw_encode(rgb.tobytes())], spp=1, photometric=1, compression=5)
add_error("spp1_on_rgb_lzw.tif", "decompresses to more than the 3000 bytes")
write_tiff("spp1_on_rgb_deflate.tif", 60, 50, [zlib.compress(rgb.tobytes())], spp=1, photometric=1, compression=8)
add_error("spp1_on_rgb_deflate.tif", "decompresses to more than the 3000 bytes")
write_tiff("rgb_ok_lzw.tif", 60, 50, [lzw_encode(rgb.tobytes())], spp=3, photometric=2, compression=5)
luma = 0.299 * rgb[..., 0] + 0.587 * rgb[..., 1] + 0.114 * rgb[..., 2]  # ITU-R BT.601
back = np.asarray(Image.open(path("rgb_ok_lzw.tif")))
assert np.array_equal(back, rgb)
add_ok("rgb_ok_lzw.tif", luma.astype(np.float32), pil_check=False)

# ---- huge declared sizes in small files
write_tiff("huge_20000_tiles.tif", 20000, 20000, [b"\0" * 16] * 4, tile=(256, 256), counts=[16] * 4)
add_error("huge_20000_tiles.tif", "more than thinfoil reads")
write_tiff("huge_tile_side.tif", 200, 200, [b"\0" * 64], tile=(60000, 60000), compression=8, counts=[64])
add_error("huge_tile_side.tif", "pixel tiles")
# the largest accepted size with a tiny Deflate stream that holds almost nothing
write_tiff("max_size_tiny_data.tif", 8192, 8192, [zlib.compress(b"\0" * 1000)], compression=8)
add_error("max_size_tiny_data.tif", "decompresses to 1000 bytes")
write_tiff("over_max_side.tif", 40000, 10, [b"\0" * 400000])
add_error("over_max_side.tif", "more than thinfoil reads")
# an IFD entry claiming 4 G values
buf = bytearray(open(path("tile256_of_200_raw.tif"), "rb").read())
n = struct.unpack_from("<H", buf, 8)[0]
for i in range(n):
    at = 10 + 12 * i
    if struct.unpack_from("<H", buf, at)[0] == 325:
        struct.pack_into("<I", buf, at + 4, 0xFFFFFFFF)
open(path("ifd_huge_count.tif"), "wb").write(buf)
add_error("ifd_huge_count.tif", "damaged or truncated TIFF")
# an IFD claiming 65535 entries
buf2 = bytearray(buf)
struct.pack_into("<H", buf2, 8, 0xFFFF)
open(path("ifd_huge_entries.tif"), "wb").write(buf2)
add_error("ifd_huge_entries.tif", "runs past the end of the file")
# PNG whose IHDR declares 16384 x 16384 pixels (ISO/IEC 15948, 11.2.2), with a tiny IDAT


def chunk(t, d):
    return struct.pack(">I", len(d)) + t + d + struct.pack(">I", zlib.crc32(t + d) & 0xFFFFFFFF)


png = b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", 16384, 16384, 16, 0, 0, 0, 0)) + \
    chunk(b"IDAT", zlib.compress(b"\0" * 100000)) + chunk(b"IEND", b"")
open(path("png_16384.png"), "wb").write(png)
add_error("png_16384.png", "more than thinfoil reads")



# Adam7-interlaced PNG (ISO/IEC 15948, 8.2), written by hand with filter type 0, read back by PIL
def adam7_png(arr):
    h, w = arr.shape
    raw = bytearray()
    for x0, y0, dx, dy in [(0, 0, 8, 8), (4, 0, 8, 8), (0, 4, 4, 8), (2, 0, 4, 4), (0, 2, 2, 4), (1, 0, 2, 2), (0, 1, 1, 2)]:
        sub = arr[y0::dy, x0::dx]
        if sub.shape[0] == 0 or sub.shape[1] == 0:
            continue
        for row in sub:
            raw += b"\0" + row.tobytes()
    return b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", w, h, 8, 0, 0, 0, 1)) + \
        chunk(b"IDAT", zlib.compress(bytes(raw))) + chunk(b"IEND", b"")


inter = rng.integers(0, 256, size=(37, 45), dtype=np.uint8)
open(path("png_adam7.png"), "wb").write(adam7_png(inter))
add_ok("png_adam7.png", inter)
# interlaced, 100 x 100 pixels declared, 50 MB of zeros in a small IDAT
open(path("png_adam7_bomb.png"), "wb").write(
    b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", 100, 100, 8, 0, 0, 0, 1)) +
    chunk(b"IDAT", zlib.compress(b"\0" * 50_000_000)) + chunk(b"IEND", b""))
add_error("png_adam7_bomb.png", "decompresses to more than its size allows")

with open(path("manifest.json"), "w") as f:
    json.dump(manifest, f)
print(len(manifest))
