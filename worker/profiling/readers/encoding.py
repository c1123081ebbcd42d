"""Which character encoding a text file uses, guessed from a sample of its bytes.

Byte order marks decide first (UTF-8, UTF-16). Then a sample that decodes as
UTF-8 is UTF-8 (ASCII included). Otherwise charset-normalizer ranks the
single-byte code pages; when several decode the sample equally well (a short
Western European sample fits cp1250 as well as cp1252), the most common one
in Western deliveries, cp1252, is preferred.
"""

from __future__ import annotations

import codecs

import charset_normalizer

from worker.profiling.errors import ProfileError

# Equally good guesses are settled in this order (common practice: cp1252 is
# what spreadsheet programs on Western-language systems write as "ANSI").
PREFERRED_WHEN_TIED = ("cp1252", "latin_1", "iso8859_15")


def detect_encoding(sample: bytes) -> str:
    """The encoding's Python codec name: "utf-8", "utf-8-sig", "utf-16", "cp1252", ...

    ``sample`` is the start of the file (possibly with its end appended); it
    may stop in the middle of a character.
    """
    if sample.startswith(codecs.BOM_UTF8):
        return "utf-8-sig"
    if sample.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
        return "utf-16"
    utf16 = utf16_without_bom(sample)
    if utf16:
        return utf16
    if _decodes(sample, "utf-8"):
        return "utf-8"
    results = charset_normalizer.from_bytes(sample)
    best = results.best()
    if best is None:
        raise ProfileError("the text encoding of the file cannot be recognised")
    tied: set[str] = set()
    for match in results:
        if match.chaos <= best.chaos + 0.01 and match.coherence >= best.coherence - 0.01:
            tied.add(match.encoding)
            tied.update(match.could_be_from_charset)
    for name in PREFERRED_WHEN_TIED:
        if name in tied:
            return name
    return best.encoding


def arrow_encoding(encoding: str) -> str:
    """The name to give pyarrow's CSV reader, which skips a UTF-8 BOM by itself."""
    return "utf8" if encoding in ("utf-8", "utf-8-sig") else encoding


def decode_sample(sample: bytes, encoding: str) -> str:
    """The sample as text, dropping a character cut off at its end."""
    decoder = codecs.getincrementaldecoder(encoding)(errors="replace")
    return decoder.decode(sample, final=False)


def _decodes(sample: bytes, encoding: str) -> bool:
    decoder = codecs.getincrementaldecoder(encoding)(errors="strict")
    try:
        decoder.decode(sample, final=False)
    except UnicodeDecodeError:
        return False
    return True


def utf16_without_bom(sample: bytes) -> str | None:
    """ "utf-16-le" or "utf-16-be" when every other byte of mostly-ASCII text is zero."""
    head = sample[:4096]
    if len(head) < 4:
        return None
    even_zero = head[0::2].count(0) / len(head[0::2])
    odd_zero = head[1::2].count(0) / len(head[1::2])
    if odd_zero > 0.4 and even_zero < 0.05:
        return "utf-16-le"
    if even_zero > 0.4 and odd_zero < 0.05:
        return "utf-16-be"
    return None
