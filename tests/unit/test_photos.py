"""Photo checks: JPEG and PNG only by content, size and pixel limits, read only inside a folder."""

from __future__ import annotations

import io
import os
import struct
import time
import zlib

import pytest
from PIL import Image

from triage.photos import (
    MAX_BYTES,
    PhotoRefused,
    check_photo,
    read_inside,
    sha256_hex,
    thumbnail_jpeg,
)


def image_bytes(fmt: str = "JPEG", size: tuple[int, int] = (64, 48)) -> bytes:
    buf = io.BytesIO()
    Image.new("RGB", size, (120, 90, 60)).save(buf, format=fmt)
    return buf.getvalue()


def png_claiming(width: int, height: int) -> bytes:
    """A PNG whose header claims `width` x `height`, with almost no pixel data behind it."""
    def chunk(kind: bytes, data: bytes) -> bytes:
        return (struct.pack(">I", len(data)) + kind + data
                + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF))

    ihdr = struct.pack(">IIBBBBB", width, height, 8, 2, 0, 0, 0)
    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr)
            + chunk(b"IDAT", zlib.compress(b"\x00" * 64)) + chunk(b"IEND", b""))


def test_jpeg_and_png_are_taken_with_their_digest():
    for fmt in ("JPEG", "PNG"):
        data = image_bytes(fmt)
        got = check_photo(data, "p")
        assert (got.format, got.width, got.height) == (fmt, 64, 48)
        assert got.sha256 == sha256_hex(data) and len(got.sha256) == 64


@pytest.mark.parametrize("fmt", ["GIF", "BMP", "TIFF", "WEBP"])
def test_other_formats_are_refused_by_content(fmt):
    data = image_bytes(fmt)
    with pytest.raises(PhotoRefused, match="not a JPEG or PNG image"):
        check_photo(data, "img/a.jpg")


def test_not_an_image_and_a_truncated_one_are_refused():
    with pytest.raises(PhotoRefused, match=r"img/x\.png: not a JPEG or PNG"):
        check_photo(b"<svg/>", "img/x.png")
    with pytest.raises(PhotoRefused, match="damaged or truncated"):
        check_photo(image_bytes("PNG", (300, 300))[:200], "t")


def test_a_pixel_bomb_is_refused_from_its_header_before_decoding():
    bomb = png_claiming(8000, 5001)          # 40.008 megapixels, a few hundred bytes
    t = time.perf_counter()
    with pytest.raises(PhotoRefused, match="8000 x 5001 pixels is over the 40-megapixel"):
        check_photo(bomb, "bomb.png")
    assert time.perf_counter() - t < 1.0
    with pytest.raises(PhotoRefused, match="10,000,000,000 pixels is over the 40-megapixel limit"):
        check_photo(png_claiming(100_000, 100_000), "bomb.png")


def test_over_twenty_megabytes_is_refused_before_opening():
    with pytest.raises(PhotoRefused, match="over the 20,000,000-byte"):
        check_photo(b"\xff\xd8" + b"\0" * MAX_BYTES, "big.jpg")


def test_read_inside_refuses_every_way_out(tmp_path):
    home = tmp_path / "survey"
    (home / "img").mkdir(parents=True)
    (home / "img" / "ok.jpg").write_bytes(b"inside")
    secret = tmp_path / "secret.png"
    secret.write_bytes(b"outside")
    (home / "img" / "out.jpg").symlink_to(secret)
    (home / "img" / "in.jpg").symlink_to(home / "img" / "ok.jpg")
    (home / "up").symlink_to(tmp_path)

    assert read_inside(home, "img/ok.jpg", "p") == b"inside"
    assert read_inside(home, "img/in.jpg", "p") == b"inside"       # a link that stays inside
    assert read_inside(home, "img/none.jpg", "p") is None
    with pytest.raises(PhotoRefused, match="absolute path"):
        read_inside(home, str(secret), "storeys[0].photos[0]")
    with pytest.raises(PhotoRefused, match=r"steps out with '\.\.'"):
        read_inside(home, "../secret.png", "p")
    with pytest.raises(PhotoRefused, match=r"steps out with '\.\.'"):
        read_inside(home, "img/../../secret.png", "p")
    with pytest.raises(PhotoRefused, match="link to a file outside"):
        read_inside(home, "img/out.jpg", "p")
    with pytest.raises(PhotoRefused, match="link to a file outside"):
        read_inside(home, "up/secret.png", "p")


def test_read_inside_refuses_a_fifo_without_blocking(tmp_path):
    os.mkfifo(tmp_path / "pipe.jpg")
    with pytest.raises(PhotoRefused, match="not a regular file"):
        read_inside(tmp_path, "pipe.jpg", "p")


def test_a_thumbnail_is_a_small_jpeg():
    data, w, h = thumbnail_jpeg(image_bytes("PNG", (2000, 1000)))
    assert max(w, h) == 640 and data[:2] == b"\xff\xd8"
    assert thumbnail_jpeg(image_bytes("GIF")) is None
    assert thumbnail_jpeg(png_claiming(9000, 9000)) is None


def test_a_jpeg_at_the_pixel_limit_is_thumbnailed_quickly(tmp_path):
    big = image_bytes("JPEG", (8000, 5000))          # exactly 40 megapixels
    check_photo(big, "big.jpg", decode=False)
    t = time.perf_counter()
    got = thumbnail_jpeg(big)
    assert got is not None and time.perf_counter() - t < 3.0
