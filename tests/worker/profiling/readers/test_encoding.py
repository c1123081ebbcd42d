"""Encoding detection on samples of invented labels in several scripts."""

from __future__ import annotations

import codecs

import pytest

from worker.profiling.readers.encoding import decode_sample, detect_encoding

SAMPLES = {
    "cp1252": "produit;prix\nCrème brûlée;3,50\nCafé;1,20\nThé glacé;2,00\nPâté;4,10\n",
    "cp1250": "miasto;osoba\nŁódź;Paweł Wiśniewski\nKraków;Zażółć gęślą\nGdańsk;Żółtowska\n",
    "cp1251": "город;жители\nМосква;12000000\nСанкт-Петербург;5000000\n",
    "cp1253": "πόλη;όνομα\nΑθήνα;Γιώργος\nΘεσσαλονίκη;Ελένη\nΠάτρα;Δημήτρης\n",
}


@pytest.mark.parametrize("encoding", sorted(SAMPLES))
def test_single_byte_code_pages_are_recognised(encoding: str) -> None:
    text = SAMPLES[encoding]
    found = detect_encoding(text.encode(encoding))
    assert found == encoding
    assert text.encode(encoding).decode(found) == text


def test_latin1_bytes_decode_correctly_as_cp1252() -> None:
    # For the letters used here latin-1 and cp1252 share their bytes (Python's codecs).
    text = "id,label\n1,Müller\n2,Gärtner\n3,Straße\n"
    assert text.encode("latin-1").decode(detect_encoding(text.encode("latin-1"))) == text


@pytest.mark.parametrize(
    ("data", "expected"),
    [
        (b"a,b\n1,2\n", "utf-8"),
        ("a,b\nπ,2\n".encode(), "utf-8"),
        (codecs.BOM_UTF8 + b"a,b\n", "utf-8-sig"),
        ("a,b\n1,2\n".encode("utf-16"), "utf-16"),
        ("a,b\n1,2\n".encode("utf-16-le"), "utf-16-le"),
        ("a,b\n1,2\n".encode("utf-16-be"), "utf-16-be"),
    ],
)
def test_unicode_forms(data: bytes, expected: str) -> None:
    assert detect_encoding(data) == expected


def test_a_sample_cut_inside_a_character_is_still_utf8() -> None:
    data = "label\nçà\n".encode()
    assert detect_encoding(data[:-2]) == "utf-8"
    assert decode_sample(data[:-2], "utf-8") == "label\nç"
