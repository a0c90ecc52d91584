#!/usr/bin/python3
"""Writes PNG and TIFF test images with an independent tool (Debian's
python3-pil, plus numpy for the pixel values) and a manifest.json listing, for
each file, the values a reader must return. Used by readImage.test.ts:

    /usr/bin/python3 test/imageio/pil_images.py OUTDIR

Expected grey values are the stored sample values; colour images use the
ITU-R BT.601 luma weights Y = 0.299 R + 0.587 G + 0.114 B. Every file is also
read back with PIL and compared to its source array, so a file that PIL itself
writes differently from what we intend is caught here, not in the reader test.
"""
import json
import os
import struct
import sys

import numpy as np
from PIL import Image

OUT = sys.argv[1]
W, H = 157, 121  # odd sizes; large enough for several strips
rng = np.random.default_rng(20240611)
manifest = []


def luma601(rgb):
    rgb = rgb.astype(np.float64)
    return 0.299 * rgb[..., 0] + 0.587 * rgb[..., 1] + 0.114 * rgb[..., 2]


def add(name, expected, bit_depth, kind, pixel_nm=None, **extra):
    entry = {
        "file": name,
        "kind": kind,
        "width": int(expected.shape[1]),
        "height": int(expected.shape[0]),
        "bitDepth": bit_depth,
        # float32 values as float64 text: exact
        "expected": [float(v) for v in expected.astype(np.float32).ravel()],
    }
    if pixel_nm is not None:
        entry["pixel_nm"] = pixel_nm
    entry.update(extra)
    manifest.append(entry)


def add_error(name, message_part):
    manifest.append({"file": name, "error": message_part})


def path(name):
    return os.path.join(OUT, name)


def check_pil(name, array):
    back = np.asarray(Image.open(path(name)))
    assert back.shape == array.shape, (name, back.shape, array.shape)
    assert np.array_equal(back, array), name


def first_ifd_entries(data):
    """(entry offset, tag, type, count) for the first IFD of a little-endian TIFF."""
    assert data[:4] == b"II*\x00"
    ifd = struct.unpack_from("<I", data, 4)[0]
    n = struct.unpack_from("<H", data, ifd)[0]
    for i in range(n):
        at = ifd + 2 + 12 * i
        tag, typ, count = struct.unpack_from("<HHI", data, at)
        yield at, tag, typ, count


def patch_short(name, tag, value):
    """Overwrite an inline SHORT field of the first IFD (TIFF 6.0, section 2)."""
    data = bytearray(open(path(name), "rb").read())
    for at, t, typ, count in first_ifd_entries(data):
        if t == tag:
            assert typ == 3 and count == 1, (tag, typ, count)
            struct.pack_into("<H", data, at + 8, value)
            open(path(name), "wb").write(data)
            return
    raise KeyError(tag)


# ---------------------------------------------------------------- PNG
grey8 = rng.integers(0, 256, size=(H, W), dtype=np.uint8)
grey16 = rng.integers(0, 65536, size=(H, W), dtype=np.uint16)
rgb8 = rng.integers(0, 256, size=(H, W, 3), dtype=np.uint8)
alpha8 = rng.integers(0, 256, size=(H, W), dtype=np.uint8)

Image.fromarray(grey8, "L").save(path("png_L8.png"))
check_pil("png_L8.png", grey8)
add("png_L8.png", grey8, 8, "png")

Image.fromarray(grey16, "I;16").save(path("png_I16.png"))
check_pil("png_I16.png", grey16.astype(np.int32))  # PIL reads 16-bit PNG as mode I
add("png_I16.png", grey16, 16, "png")

Image.fromarray(rgb8, "RGB").save(path("png_RGB.png"))
check_pil("png_RGB.png", rgb8)
add("png_RGB.png", luma601(rgb8), 8, "png")

rgba8 = np.dstack([rgb8, alpha8])
Image.fromarray(rgba8, "RGBA").save(path("png_RGBA.png"))
check_pil("png_RGBA.png", rgba8)
add("png_RGBA.png", luma601(rgb8), 8, "png")

la8 = np.dstack([grey8, alpha8])
Image.fromarray(la8, "LA").save(path("png_LA.png"))
check_pil("png_LA.png", la8)
add("png_LA.png", grey8, 8, "png")

palette = rng.integers(0, 256, size=(256, 3), dtype=np.uint8)
pim = Image.fromarray(grey8, "P")
pim.putpalette(palette.ravel().tolist())
pim.save(path("png_P.png"))
assert np.array_equal(np.asarray(Image.open(path("png_P.png"))), grey8)
add("png_P.png", luma601(palette[grey8]), 8, "png")

# tRNS chunk marking grey level 77 transparent: the stored values must survive
Image.fromarray(grey8, "L").save(path("png_L8_trns.png"), transparency=77)
assert b"tRNS" in open(path("png_L8_trns.png"), "rb").read()
add("png_L8_trns.png", grey8, 8, "png")

bits = grey8 > 127
Image.fromarray(bits).save(path("png_1bit.png"))  # mode '1', PNG bit depth 1
add("png_1bit.png", bits.astype(np.uint8), 1, "png")

# pHYs chunk: pixels per metre (ISO/IEC 15948, 11.3.5.3)
Image.fromarray(grey8, "L").save(path("png_L8_dpi.png"), dpi=(50_800_000, 50_800_000))
raw = open(path("png_L8_dpi.png"), "rb").read()
p = raw.index(b"pHYs")
ppm_x, ppm_y, unit = struct.unpack_from(">IIB", raw, p + 4)
assert unit == 1 and ppm_x == ppm_y
add("png_L8_dpi.png", grey8, 8, "png", pixel_nm=1e9 / ppm_x)

# ---------------------------------------------------------------- TIFF
int32 = rng.integers(-(2**31), 2**31, size=(H, W), dtype=np.int64).astype(np.int32)
f32 = (rng.standard_normal((H, W)) * 1e3).astype(np.float32)
f32[0, :6] = [0.0, -0.0, 1e-40, -3.4e38, 3.4e38, 1.5]  # subnormal and extremes
COMPRESSIONS = {"raw": None, "lzw": "tiff_lzw", "deflate": "tiff_deflate",
                "adobe_deflate": "tiff_adobe_deflate", "packbits": "packbits"}

for label, comp in COMPRESSIONS.items():
    opts = {} if comp is None else {"compression": comp}
    n = f"tif_L8_{label}.tif"
    Image.fromarray(grey8, "L").save(path(n), **opts)
    check_pil(n, grey8)
    add(n, grey8, 8, "tiff")

    n = f"tif_I16_{label}.tif"
    Image.fromarray(grey16, "I;16").save(path(n), **opts)
    check_pil(n, grey16)
    add(n, grey16, 16, "tiff")

    n = f"tif_I32_{label}.tif"
    Image.fromarray(int32, "I").save(path(n), **opts)
    check_pil(n, int32)
    add(n, int32, 32, "tiff")  # expected rounded to float32 by add()

    n = f"tif_F32_{label}.tif"
    Image.fromarray(f32, "F").save(path(n), **opts)
    check_pil(n, f32)
    add(n, f32, 32, "tiff")

# uncompressed in several strips, written through libtiff (PIL's own writer uses one strip)
from PIL import TiffImagePlugin  # noqa: E402
TiffImagePlugin.WRITE_LIBTIFF = True
tall16 = rng.integers(0, 65536, size=(700, W), dtype=np.uint16)
tall8 = rng.integers(0, 256, size=(700, W), dtype=np.uint8)
for mode, arr, depth in [("F", f32, 32), ("I;16", tall16, 16), ("L", tall8, 8)]:
    n = f"tif_libtiff_raw_{depth}.tif"
    Image.fromarray(arr, mode).save(path(n))
    assert len(Image.open(path(n)).tag_v2[273]) > 1, n
    check_pil(n, arr)
    add(n, arr, depth, "tiff")
TiffImagePlugin.WRITE_LIBTIFF = False

# horizontal differencing, Predictor 2 (TIFF 6.0, section 14), written by libtiff
for mode, arr, depth, comp in [("L", grey8, 8, "tiff_lzw"), ("I;16", grey16, 16, "tiff_lzw"),
                               ("I", int32, 32, "tiff_adobe_deflate")]:
    n = f"tif_pred2_{depth}.tif"
    Image.fromarray(arr, mode).save(path(n), compression=comp, tiffinfo={317: 2})
    assert Image.open(path(n)).tag_v2.get(317) == 2
    check_pil(n, arr)
    add(n, arr, depth, "tiff")
# the same, tall enough for several strips
for mode, arr, depth in [("L", tall8, 8), ("I;16", tall16, 16)]:
    n = f"tif_pred2_tall_{depth}.tif"
    Image.fromarray(arr, mode).save(path(n), compression="tiff_lzw", tiffinfo={317: 2})
    tags = Image.open(path(n)).tag_v2
    assert tags.get(317) == 2 and len(tags[273]) > 1, n
    check_pil(n, arr)
    add(n, arr, depth, "tiff")
Image.fromarray(rgb8, "RGB").save(path("tif_pred2_rgb.tif"), compression="tiff_lzw", tiffinfo={317: 2})
assert Image.open(path("tif_pred2_rgb.tif")).tag_v2.get(317) == 2
check_pil("tif_pred2_rgb.tif", rgb8)
add("tif_pred2_rgb.tif", luma601(rgb8), 8, "tiff")

# big-endian ("MM") 16-bit
Image.frombytes("I;16B", (W, H), grey16.astype(">u2").tobytes()).save(path("tif_I16_be.tif"))
assert open(path("tif_I16_be.tif"), "rb").read(2) == b"MM"
add("tif_I16_be.tif", grey16, 16, "tiff")

# colour and palette TIFFs
Image.fromarray(rgb8, "RGB").save(path("tif_RGB.tif"))
add("tif_RGB.tif", luma601(rgb8), 8, "tiff")
Image.fromarray(rgba8, "RGBA").save(path("tif_RGBA.tif"))
add("tif_RGBA.tif", luma601(rgb8), 8, "tiff")
Image.fromarray(la8, "LA").save(path("tif_LA.tif"))
add("tif_LA.tif", grey8, 8, "tiff")
pim.save(path("tif_P.tif"))
pal_back = Image.open(path("tif_P.tif"))
# TIFF ColorMap holds 16-bit entries; PIL writes 8-bit colour c as c * 256
cmap = np.array(pal_back.tag_v2[320], dtype=np.float64).reshape(3, 256).T
add("tif_P.tif", luma601(cmap[grey8]), 16, "tiff")

# several pages: the first one is read
Image.fromarray(grey8, "L").save(path("tif_pages.tif"), save_all=True,
                                 append_images=[Image.fromarray(255 - grey8, "L")])
assert getattr(Image.open(path("tif_pages.tif")), "n_frames", 1) == 2
add("tif_pages.tif", grey8, 8, "tiff")

# resolution: pixels per centimetre and per inch (TIFF 6.0, section 8)
Image.fromarray(f32, "F").save(path("tif_F32_cm.tif"), resolution=12345.5, resolution_unit=3)
add("tif_F32_cm.tif", f32, 32, "tiff", pixel_nm=1e7 / 12345.5)
Image.fromarray(grey16, "I;16").save(path("tif_I16_inch.tif"), dpi=(254000, 254000))
add("tif_I16_inch.tif", grey16, 16, "tiff", pixel_nm=2.54e7 / 254000)

# unsigned 32-bit: PIL writes signed; relabel SampleFormat 2 -> 1 (TIFF 6.0, section 19)
Image.fromarray(int32, "I").save(path("tif_U32.tif"))
patch_short("tif_U32.tif", 339, 1)
add("tif_U32.tif", int32.view(np.uint32), 32, "tiff")

# WhiteIsZero: relabel PhotometricInterpretation 1 -> 0; a reader shows 255 - v
Image.fromarray(grey8, "L").save(path("tif_white0.tif"))
patch_short("tif_white0.tif", 262, 0)
add("tif_white0.tif", 255 - grey8.astype(np.int32), 8, "tiff")

# tiled, uncompressed, 16-bit little-endian, edge tiles partly outside the image.
# Written by hand from TIFF 6.0 section 15 and checked with PIL.
TW = TL = 16
th, tw = 37, 40
tiled = grey16[:th, :tw]
across, down = -(-tw // TW), -(-th // TL)
tiles = []
for ty in range(down):
    for tx in range(across):
        block = np.zeros((TL, TW), dtype="<u2")
        part = tiled[ty * TL:(ty + 1) * TL, tx * TW:(tx + 1) * TW]
        block[:part.shape[0], :part.shape[1]] = part
        tiles.append(block.tobytes())
fields = [(256, 3, [tw]), (257, 3, [th]), (258, 3, [16]), (259, 3, [1]), (262, 3, [1]),
          (277, 3, [1]), (322, 3, [TW]), (323, 3, [TL]), (324, 4, None), (325, 4, [len(t) for t in tiles])]
n_tiles = len(tiles)
ifd_size = 2 + 12 * len(fields) + 4
extra_at = 8 + ifd_size
offsets_at = extra_at
counts_at = offsets_at + 4 * n_tiles
data_at = counts_at + 4 * n_tiles
tile_offsets = [data_at + i * len(tiles[0]) for i in range(n_tiles)]
buf = bytearray(b"II*\x00" + struct.pack("<I", 8) + struct.pack("<H", len(fields)))
for tag, typ, vals in fields:
    if tag == 324:
        buf += struct.pack("<HHII", tag, typ, n_tiles, offsets_at)
    elif tag == 325:
        buf += struct.pack("<HHII", tag, typ, n_tiles, counts_at)
    else:
        buf += struct.pack("<HHIHH", tag, typ, 1, vals[0], 0)
buf += struct.pack("<I", 0)
buf += struct.pack(f"<{n_tiles}I", *tile_offsets) + struct.pack(f"<{n_tiles}I", *[len(t) for t in tiles])
buf += b"".join(tiles)
open(path("tif_tiled16.tif"), "wb").write(buf)
check_pil("tif_tiled16.tif", tiled)
add("tif_tiled16.tif", tiled, 16, "tiff")



def packbits_literal(data):
    """PackBits (TIFF 6.0, section 9) using literal runs only: a valid, if unpacked, stream."""
    out = bytearray()
    for i in range(0, len(data), 128):
        chunk = data[i:i + 128]
        out.append(len(chunk) - 1)
        out += chunk
    return bytes(out)


def write_be_strips(name, arr, bps, sample_format, compression, rows_per_strip):
    """Big-endian ("MM") greyscale TIFF, written by hand from TIFF 6.0 sections 2, 3 and 9."""
    h, w = arr.shape
    strips = []
    for y in range(0, h, rows_per_strip):
        raw = arr[y:y + rows_per_strip].tobytes()
        strips.append(packbits_literal(raw) if compression == 32773 else raw)
    n = len(strips)
    fields = [(256, 4, w), (257, 4, h), (258, 3, bps), (259, 3, compression), (262, 3, 1),
              (273, 4, None), (277, 3, 1), (278, 4, rows_per_strip), (279, 4, None), (339, 3, sample_format)]
    ifd_size = 2 + 12 * len(fields) + 4
    offsets_at = 8 + ifd_size
    counts_at = offsets_at + 4 * n
    data_at = counts_at + 4 * n
    offs, o = [], data_at
    for st in strips:
        offs.append(o)
        o += len(st)
    buf = bytearray(b"MM\x00*" + struct.pack(">I", 8) + struct.pack(">H", len(fields)))
    for tag, typ, val in fields:
        if tag in (273, 279):
            at = offsets_at if tag == 273 else counts_at
            buf += struct.pack(">HHII", tag, typ, n, at)
        elif typ == 3:
            buf += struct.pack(">HHIHH", tag, typ, 1, val, 0)
        else:
            buf += struct.pack(">HHII", tag, typ, 1, val)
    buf += struct.pack(">I", 0)
    buf += struct.pack(f">{n}I", *offs) + struct.pack(f">{n}I", *[len(st) for st in strips])
    buf += b"".join(strips)
    open(path(name), "wb").write(buf)


write_be_strips("tif_be16_packbits.tif", grey16.astype(">u2"), 16, 1, 32773, 20)
check_pil("tif_be16_packbits.tif", grey16)
add("tif_be16_packbits.tif", grey16, 16, "tiff")
write_be_strips("tif_beF32.tif", f32.astype(">f4"), 32, 3, 1, 30)
check_pil("tif_beF32.tif", f32)
add("tif_beF32.tif", f32, 32, "tiff")
write_be_strips("tif_beI32.tif", int32.astype(">i4"), 32, 2, 1, 50)
check_pil("tif_beI32.tif", int32)
add("tif_beI32.tif", int32, 32, "tiff")

# files thinfoil must refuse, with the phrase its message must contain
Image.fromarray(grey8, "L").save(path("tif_12bit.tif"))
patch_short("tif_12bit.tif", 258, 12)
add_error("tif_12bit.tif", "uses 12-bit samples, which thinfoil cannot read; save it as 8, 16 or 32 bit")
Image.fromarray(rgb8, "RGB").save(path("tif_jpeg.tif"), compression="jpeg")
add_error("tif_jpeg.tif", "uses TIFF compression 7 (JPEG)")
Image.fromarray(grey8, "L").save(path("tif_orient.tif"), tiffinfo={274: 3})
assert Image.open(path("tif_orient.tif")).tag_v2.get(274) == 3
add_error("tif_orient.tif", "orientation 3")
Image.fromarray(np.zeros((H, W, 4), dtype=np.uint8), "CMYK").save(path("tif_cmyk.tif"))
add_error("tif_cmyk.tif", "CMYK colour model")
full = open(path("tif_F32_raw.tif"), "rb").read()
open(path("tif_truncated.tif"), "wb").write(full[: len(full) // 2])
add_error("tif_truncated.tif", "damaged or truncated TIFF")
full = open(path("png_L8.png"), "rb").read()
open(path("png_truncated.png"), "wb").write(full[: len(full) // 2])
add_error("png_truncated.png", "damaged PNG")
Image.fromarray(rgb8, "RGB").save(path("photo.jpg"))
add_error("photo.jpg", "is not a PNG or TIFF file")

with open(path("manifest.json"), "w") as f:
    json.dump(manifest, f)
print(len(manifest))
