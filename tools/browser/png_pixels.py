"""Decodes a PNG with zlib alone and says whether it shows anything (no PIL needed).

Enough of PNG (ISO/IEC 15948) for screenshots: 8-bit greyscale, RGB, palette, grey+alpha and RGBA,
not interlaced. Rows are unfiltered per the standard's five filter types; the common Up filter is
done a whole row at a time with integer arithmetic, the others byte by byte.
"""

import collections
import struct
import zlib

_SIGNATURE = b"\x89PNG\r\n\x1a\n"
_CHANNELS = {0: 1, 2: 3, 3: 1, 4: 2, 6: 4}   # colour type -> samples per pixel


class PngError(Exception):
    pass


class Image:
    """Width, height and rows of RGB pixels as bytes (3 per pixel)."""

    def __init__(self, width, height, rgb_rows):
        self.width, self.height, self.rows = width, height, rgb_rows


def _chunks(data):
    if not data.startswith(_SIGNATURE):
        raise PngError("not a PNG file (bad signature)")
    pos = len(_SIGNATURE)
    while pos + 12 <= len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        if len(body) != length:
            raise PngError("truncated chunk " + kind.decode("latin-1"))
        yield kind, body
        pos += 12 + length


def _add_bytes(a, b):
    """Byte-wise (a + b) mod 256 of two equal-length byte strings, without carries between bytes."""
    n = len(a)
    x, y = int.from_bytes(a, "big"), int.from_bytes(b, "big")
    low = int.from_bytes(b"\x7f" * n, "big")
    high = int.from_bytes(b"\x80" * n, "big")
    return (((x & low) + (y & low)) ^ ((x ^ y) & high)).to_bytes(n, "big")


def unfilter(raw, width, height, bpp):
    """Reverses the per-row filters; returns the rows of raw samples."""
    stride = width * bpp
    if len(raw) < height * (stride + 1):
        raise PngError("image data is shorter than its header says")
    rows = []
    prev = bytes(stride)
    for r in range(height):
        start = r * (stride + 1)
        kind = raw[start]
        line = raw[start + 1:start + 1 + stride]
        if kind == 0:
            cur = bytes(line)
        elif kind == 2:
            cur = _add_bytes(line, prev)
        elif kind in (1, 3, 4):
            cur = bytearray(line)
            for i in range(stride):
                left = cur[i - bpp] if i >= bpp else 0
                if kind == 1:
                    cur[i] = (cur[i] + left) & 0xFF
                elif kind == 3:
                    cur[i] = (cur[i] + ((left + prev[i]) >> 1)) & 0xFF
                else:
                    up = prev[i]
                    corner = prev[i - bpp] if i >= bpp else 0
                    p = left + up - corner
                    pa, pb, pc = abs(p - left), abs(p - up), abs(p - corner)
                    pred = left if pa <= pb and pa <= pc else (up if pb <= pc else corner)
                    cur[i] = (cur[i] + pred) & 0xFF
            cur = bytes(cur)
        else:
            raise PngError(f"row {r} has unknown filter type {kind}")
        rows.append(cur)
        prev = cur
    return rows


def decode(data):
    """The image in `data` (PNG bytes) as RGB rows; alpha is dropped (screenshots are opaque)."""
    header, palette, idat = None, None, []
    for kind, body in _chunks(data):
        if kind == b"IHDR":
            header = struct.unpack(">IIBBBBB", body)
        elif kind == b"PLTE":
            palette = body
        elif kind == b"IDAT":
            idat.append(body)
    if header is None:
        raise PngError("no IHDR chunk")
    width, height, depth, colour, _, _, interlace = header
    if depth != 8 or colour not in _CHANNELS:
        raise PngError(f"unsupported PNG: bit depth {depth}, colour type {colour}")
    if interlace:
        raise PngError("unsupported PNG: interlaced")
    if colour == 3 and palette is None:
        raise PngError("palette image without PLTE chunk")
    bpp = _CHANNELS[colour]
    rows = unfilter(zlib.decompress(b"".join(idat)), width, height, bpp)
    rgb = []
    for row in rows:
        if colour == 2:
            rgb.append(row)
        elif colour == 6:
            out = bytearray(width * 3)
            out[0::3], out[1::3], out[2::3] = row[0::4], row[1::4], row[2::4]
            rgb.append(bytes(out))
        elif colour == 3:
            rgb.append(b"".join(palette[3 * i:3 * i + 3] for i in row))
        else:   # grey, grey + alpha
            grey = row if colour == 0 else row[0::2]
            out = bytearray(width * 3)
            out[0::3] = out[1::3] = out[2::3] = grey
            rgb.append(bytes(out))
    return Image(width, height, rgb)


def encode_rgb(width, height, rgb_rows, filters):
    """A PNG of RGB rows, row r filtered with filters[r % len(filters)]; for testing the decoder."""
    def filtered(kind, cur, prev):
        out = bytearray(len(cur))
        for i in range(len(cur)):
            left = cur[i - 3] if i >= 3 else 0
            up = prev[i]
            corner = prev[i - 3] if i >= 3 else 0
            if kind == 0:
                pred = 0
            elif kind == 1:
                pred = left
            elif kind == 2:
                pred = up
            elif kind == 3:
                pred = (left + up) >> 1
            else:
                p = left + up - corner
                pa, pb, pc = abs(p - left), abs(p - up), abs(p - corner)
                pred = left if pa <= pb and pa <= pc else (up if pb <= pc else corner)
            out[i] = (cur[i] - pred) & 0xFF
        return bytes([kind]) + bytes(out)

    prev = bytes(width * 3)
    raw = b""
    for r, row in enumerate(rgb_rows):
        raw += filtered(filters[r % len(filters)], row, prev)
        prev = row

    def chunk(kind, body):
        return struct.pack(">I", len(body)) + kind + body + struct.pack(">I", zlib.crc32(kind + body))

    return (_SIGNATURE + chunk(b"IHDR", struct.pack(">IIBBBBB", width, height, 8, 2, 0, 0, 0)) +
            chunk(b"IDAT", zlib.compress(raw)) + chunk(b"IEND", b""))


class Ink:
    """How much a picture shows: distinct colours and the share of pixels that are not background."""

    def __init__(self, image, background=(255, 255, 255)):
        counts = collections.Counter()
        blank_row = bytes(background) * image.width
        blank_rows = 0
        for row in image.rows:
            if row == blank_row:   # most of a page is empty rows: skip them cheaply
                blank_rows += 1
            else:
                counts.update(zip(row[0::3], row[1::3], row[2::3]))
        counts[tuple(background)] += blank_rows * image.width
        self.distinct_colours = len(counts)
        self.ink_share = 1.0 - counts[tuple(background)] / max(1, image.width * image.height)
