#!/usr/bin/env python3
"""Writes the WAV fixtures that packages/dsp/test/io checks decodeWav against.

Each file is written by an outside tool (scipy.io.wavfile.write, Python's `wave` module, or
hand-packed RIFF headers with `struct` for layouts neither writer produces), then read back
with scipy.io.wavfile.read; scipy's samples, scaled the way Earmark states (integers divided
by 2^(bits-1), 24-bit via scipy's left-justified int32 divided by 2^31, 8-bit unsigned as
(x-128)/128), go into expected.json. Deterministic: re-running gives the same bytes.

Usage: python3 generate.py [output-dir]   (default: fixtures/ beside this script)
"""
import json
import os
import struct
import sys
import wave

import numpy as np
import scipy.io.wavfile as wavfile

GUID_TAIL = bytes([0x00, 0x00, 0x10, 0x00, 0x80, 0x00, 0x00, 0xAA, 0x00, 0x38, 0x9B, 0x71])


def signal(rng, frames, channels):
    """A sine per channel plus a little noise, in [-1, 1], with both extremes present."""
    n = np.arange(frames)
    cols = []
    for c in range(channels):
        x = 0.8 * np.sin(2 * np.pi * (c + 1) * n / 16.0) + 0.1 * rng.standard_normal(frames)
        cols.append(np.clip(x, -1.0, 1.0))
    out = np.stack(cols, axis=1)
    out[0, 0] = -1.0
    out[1, 0] = 1.0
    return out


def to_int(x, bits):
    scale = 2 ** (bits - 1)
    return np.clip(np.round(x * scale), -scale, scale - 1).astype(np.int64)


def chunk(cid, body):
    pad = b"\x00" if len(body) % 2 else b""
    return cid + struct.pack("<I", len(body)) + body + pad


def pack_samples(ints_or_floats, kind, bits):
    flat = ints_or_floats.reshape(-1)
    if kind == "float":
        return flat.astype("<f4" if bits == 32 else "<f8").tobytes()
    if bits == 8:
        return (flat + 128).astype("<u1").tobytes()
    if bits == 16:
        return flat.astype("<i2").tobytes()
    if bits == 32:
        return flat.astype("<i4").tobytes()
    if bits == 24:
        b = flat.astype("<i4").tobytes()
        return b"".join(b[i:i + 3] for i in range(0, len(b), 4))
    raise ValueError(bits)


def riff(chunks):
    body = b"WAVE" + b"".join(chunks)
    return b"RIFF" + struct.pack("<I", len(body)) + body


def fmt_plain(tag, channels, rate, bits):
    align = channels * bits // 8
    return struct.pack("<HHIIHH", tag, channels, rate, rate * align, align, bits)


def fmt_extensible(sub, channels, rate, bits, valid, mask):
    align = channels * bits // 8
    return struct.pack("<HHIIHHHHI", 0xFFFE, channels, rate, rate * align, align, bits, 22, valid, mask) + struct.pack("<I", sub) + GUID_TAIL


def expected_from_scipy(path):
    rate, data = wavfile.read(path)
    if data.ndim == 1:
        data = data[:, None]
    if data.dtype == np.uint8:
        scaled = (data.astype(np.float64) - 128) / 128
    elif data.dtype == np.int16:
        scaled = data / 2.0 ** 15
    elif data.dtype == np.int32:
        scaled = data / 2.0 ** 31  # 24-bit arrives left-justified in int32
    else:
        scaled = data.astype(np.float64)
    return rate, [scaled[:, c].tolist() for c in range(scaled.shape[1])]


def main():
    out_dir = sys.argv[1] if len(sys.argv) > 1 else os.path.join(os.path.dirname(os.path.abspath(__file__)), "fixtures")
    os.makedirs(out_dir, exist_ok=True)
    rng = np.random.default_rng(20240611)
    cases = []

    def add(name, meta):
        path = os.path.join(out_dir, name)
        rate, samples = expected_from_scipy(path)
        assert rate == meta["sampleRate"], name
        cases.append(dict(file=name, frames=len(samples[0]), channels=len(samples), samples=samples, **meta))

    # scipy writer: plain PCM / IEEE float headers.
    x = signal(rng, 48, 1)
    wavfile.write(os.path.join(out_dir, "pcm16-mono-44100.wav"), 44100, to_int(x, 16).astype(np.int16)[:, 0])
    add("pcm16-mono-44100.wav", dict(sampleRate=44100, bitsPerSample=16, encoding="pcm-int", formatTag=1, extensible=False))

    x = signal(rng, 40, 2)
    wavfile.write(os.path.join(out_dir, "pcm32-stereo-96000.wav"), 96000, to_int(x, 32).astype(np.int32))
    add("pcm32-stereo-96000.wav", dict(sampleRate=96000, bitsPerSample=32, encoding="pcm-int", formatTag=1, extensible=False))

    x = signal(rng, 48, 1)
    wavfile.write(os.path.join(out_dir, "float32-mono-48000.wav"), 48000, x.astype(np.float32)[:, 0])
    add("float32-mono-48000.wav", dict(sampleRate=48000, bitsPerSample=32, encoding="float", formatTag=3, extensible=False))

    x = signal(rng, 32, 2)
    x[5, 1] = 1.75  # float files may exceed full scale; the decoder keeps it
    wavfile.write(os.path.join(out_dir, "float64-stereo-8000.wav"), 8000, x.astype(np.float64))
    add("float64-stereo-8000.wav", dict(sampleRate=8000, bitsPerSample=64, encoding="float", formatTag=3, extensible=False))

    x = signal(rng, 32, 1)
    wavfile.write(os.path.join(out_dir, "pcm8-mono-8000.wav"), 8000, (to_int(x, 8) + 128).astype(np.uint8)[:, 0])
    add("pcm8-mono-8000.wav", dict(sampleRate=8000, bitsPerSample=8, encoding="pcm-int", formatTag=1, extensible=False))

    # Python's wave module: 24-bit PCM (scipy cannot write it).
    x = signal(rng, 48, 2)
    with wave.open(os.path.join(out_dir, "pcm24-stereo-48000.wav"), "wb") as w:
        w.setnchannels(2)
        w.setsampwidth(3)
        w.setframerate(48000)
        w.writeframes(pack_samples(to_int(x, 24), "int", 24))
    add("pcm24-stereo-48000.wav", dict(sampleRate=48000, bitsPerSample=24, encoding="pcm-int", formatTag=1, extensible=False))

    # Hand-packed: WAVE_FORMAT_EXTENSIBLE, multi-channel, extra and odd-sized chunks.
    x = signal(rng, 24, 6)
    data = pack_samples(to_int(x, 24), "int", 24)
    with open(os.path.join(out_dir, "ext-pcm24-6ch-48000.wav"), "wb") as f:
        f.write(riff([chunk(b"fmt ", fmt_extensible(1, 6, 48000, 24, 24, 0x3F)), chunk(b"data", data)]))
    add("ext-pcm24-6ch-48000.wav", dict(sampleRate=48000, bitsPerSample=24, encoding="pcm-int", formatTag=0xFFFE, extensible=True, channelMask=0x3F, validBitsPerSample=24))

    x = signal(rng, 16, 8)
    data = pack_samples(x.astype(np.float32), "float", 32)
    with open(os.path.join(out_dir, "ext-float32-8ch-192000.wav"), "wb") as f:
        f.write(riff([
            chunk(b"fmt ", fmt_extensible(3, 8, 192000, 32, 32, 0x63F)),
            chunk(b"fact", struct.pack("<I", 16)),
            chunk(b"data", data),
        ]))
    add("ext-float32-8ch-192000.wav", dict(sampleRate=192000, bitsPerSample=32, encoding="float", formatTag=0xFFFE, extensible=True, channelMask=0x63F, validBitsPerSample=32))

    x = signal(rng, 32, 2)
    data = pack_samples(to_int(x, 16), "int", 16)
    with open(os.path.join(out_dir, "ext-pcm16-stereo-22050.wav"), "wb") as f:
        f.write(riff([chunk(b"fmt ", fmt_extensible(1, 2, 22050, 16, 16, 0x3)), chunk(b"data", data)]))
    add("ext-pcm16-stereo-22050.wav", dict(sampleRate=22050, bitsPerSample=16, encoding="pcm-int", formatTag=0xFFFE, extensible=True, channelMask=0x3, validBitsPerSample=16))

    # LIST (odd size, padded) before fmt, an odd-sized unknown chunk between fmt and data, a
    # data chunk that starts at an offset not divisible by 4, and a chunk after the data.
    x = signal(rng, 30, 2)
    data = pack_samples(to_int(x, 16), "int", 16)
    info = b"INFO" + chunk(b"ISFT", b"earmark-ref\x00")[:-1]  # odd total size
    with open(os.path.join(out_dir, "chunks-odd-pcm16-stereo-32000.wav"), "wb") as f:
        f.write(riff([
            chunk(b"LIST", info),
            chunk(b"fmt ", fmt_plain(1, 2, 32000, 16)),
            chunk(b"xtra", b"abcdef"),  # even but not a multiple of 4: data starts unaligned
            chunk(b"data", data),
            chunk(b"tail", b"zzzzz"),
        ]))
    add("chunks-odd-pcm16-stereo-32000.wav", dict(sampleRate=32000, bitsPerSample=16, encoding="pcm-int", formatTag=1, extensible=False))

    # 24-bit mono with an odd number of data bytes: the data chunk is followed by a pad byte.
    x = signal(rng, 33, 1)
    data = pack_samples(to_int(x, 24), "int", 24)
    assert len(data) % 2 == 1
    with open(os.path.join(out_dir, "pcm24-odd-data-mono-16000.wav"), "wb") as f:
        f.write(riff([chunk(b"fmt ", fmt_plain(1, 1, 16000, 24)), chunk(b"data", data), chunk(b"LIST", b"INFO")]))
    add("pcm24-odd-data-mono-16000.wav", dict(sampleRate=16000, bitsPerSample=24, encoding="pcm-int", formatTag=1, extensible=False))

    with open(os.path.join(out_dir, "expected.json"), "w") as f:
        json.dump({"generator": "scipy " + __import__("scipy").__version__ + ", numpy " + np.__version__, "cases": cases}, f)
        f.write("\n")


if __name__ == "__main__":
    main()
