"""Which character encoding a text file uses, guessed from a sample of its bytes.

Byte order marks decide first (UTF-8, UTF-16). Then a sample that decodes as
UTF-8 is UTF-8 (ASCII included). Otherwise charset-normalizer ranks the
single-byte code pages; when several decode the sample about equally well (a
short Western European sample fits cp1250 as well as cp1252, a Russian one
mac_cyrillic nearly as well as cp1251), the Windows code pages are preferred.
"""

from __future__ import annotations

import codecs

import charset_normalizer

from worker.profiling.errors import ProfileError

# Guesses whose "chaos" (charset-normalizer's mess measure, 0 to 1) is within
# this much of the best one count as equally good; among them the Windows code
# pages win, cp1252 first, then the better language coherence (common
# practice: spreadsheet programs on Windows write these as "ANSI"; Mac and DOS
# code pages are rare in deliveries). Known limit: a short Turkish cp1254
# sample that also decodes cleanly as cp1252 is reported as cp1252.
CHAOS_TOLERANCE = 0.05


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
    candidates: list[tuple[int, bool, float, float, str]] = []
    for match in results:
        if match.chaos <= best.chaos + CHAOS_TOLERANCE:
            for name in match.could_be_from_charset:
                rank = (_tier(name), name != "cp1252", -round(match.coherence, 3), match.chaos)
                candidates.append((*rank, name))
    return min(candidates)[-1] if candidates else best.encoding


def _tier(name: str) -> int:
    """Lower is likelier in a delivered file: Windows code pages, then ISO 8859, then others."""
    if name.startswith("cp125"):
        return 0
    if name == "latin_1" or name.startswith("iso8859"):
        return 1
    return 2


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
