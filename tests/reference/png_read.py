"""Decoding a PNG file with Python's zlib alone, by the rules of the PNG
standard (W3C, Portable Network Graphics (PNG) Specification, 2nd edition, also
ISO/IEC 15948: signature, chunks with CRC-32, IHDR, IDAT, the filter types 0-4
of section 9), so that checks of Cairn's pictures do not rely on the library
that wrote them. Imported by the reference checks; never run by ctest (not a
test_*.py).
"""
import struct
import zlib


def decode_png(data):
    """(width, height, channels, pixel bytes) of an 8-bit RGB or RGBA, non-interlaced PNG."""
    assert data[:8] == b"\x89PNG\r\n\x1a\n", "not a PNG signature"
    pos, idat, ihdr = 8, b"", None
    while pos < len(data):
        (length,) = struct.unpack(">I", data[pos:pos + 4])
        kind = data[pos + 4:pos + 8]
        body = data[pos + 8:pos + 8 + length]
        crc = struct.unpack(">I", data[pos + 8 + length:pos + 12 + length])[0]
        assert zlib.crc32(kind + body) & 0xFFFFFFFF == crc, "bad CRC in %r" % kind
        if kind == b"IHDR":
            ihdr = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat += body
        elif kind == b"IEND":
            break
        pos += 12 + length
    w, h, depth, colour, _, _, interlace = ihdr
    assert depth == 8 and colour in (2, 6) and interlace == 0, "expected 8-bit RGB/RGBA, not interlaced: %r" % (ihdr,)
    bpp = 3 if colour == 2 else 4
    raw = zlib.decompress(idat)
    stride = w * bpp
    out, prev = bytearray(h * stride), bytearray(stride)
    i = 0
    for y in range(h):
        f = raw[i]
        line = bytearray(raw[i + 1:i + 1 + stride])
        i += 1 + stride
        for x in range(stride):
            a = line[x - bpp] if x >= bpp else 0
            b = prev[x]
            c = prev[x - bpp] if x >= bpp else 0
            if f == 1:
                line[x] = (line[x] + a) & 0xFF
            elif f == 2:
                line[x] = (line[x] + b) & 0xFF
            elif f == 3:
                line[x] = (line[x] + (a + b) // 2) & 0xFF
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                pred = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
                line[x] = (line[x] + pred) & 0xFF
        out[y * stride:(y + 1) * stride] = line
        prev = line
    return w, h, bpp, bytes(out)


def read_png(path):
    """(width, height, rows of RGBA bytes) of an 8-bit RGBA, non-interlaced PNG."""
    w, h, bpp, px = decode_png(open(path, "rb").read())
    assert bpp == 4, "expected RGBA"
    stride = w * 4
    return w, h, [px[y * stride:(y + 1) * stride] for y in range(h)]
