"""Dialect sniffing: delimiter, quoting, header and number style, by construction."""

from __future__ import annotations

from worker.profiling.readers.sniff import declared_delimiter, sniff_dialect


def test_semicolons_win_over_decimal_commas() -> None:
    dialect = sniff_dialect("a;b\n1,5;2,25\n3,0;4,75\n", complete=True)
    assert (dialect.delimiter, dialect.decimal) == (";", ",")


def test_commas_inside_quotes_do_not_split() -> None:
    dialect = sniff_dialect('name,remark\nA,"x, y; z"\nB,"p; q, r"\n', complete=True)
    assert dialect.delimiter == ","


def test_single_quotes_are_recognised_when_they_wrap_fields() -> None:
    dialect = sniff_dialect("'a','b'\n'x, y','2'\n'z','3'\n", complete=True)
    assert (dialect.quotechar, dialect.delimiter) == ("'", ",")


def test_cut_off_last_line_is_ignored() -> None:
    dialect = sniff_dialect("a|b|c\n1|2|3\n4|5|6\n7|8", complete=False)
    assert dialect.delimiter == "|"


def test_numeric_first_row_means_no_header() -> None:
    assert sniff_dialect("1,2\n3,4\n", complete=True).header is False
    assert sniff_dialect("x,y\n3,4\n", complete=True).header is True


def test_dates_in_first_row_mean_no_header() -> None:
    assert sniff_dialect("2026-01-02,a\n2026-01-03,b\n", complete=True).header is False


def test_space_thousands() -> None:
    dialect = sniff_dialect("lot;kg\nA;1 234,5\nB;12 000,25\n", complete=True)
    assert (dialect.decimal, dialect.thousands) == (",", " ")


def test_one_column_file_keeps_the_comma_default() -> None:
    dialect = sniff_dialect("label\nred\nblue\n", complete=True)
    assert (dialect.delimiter, dialect.header) == (",", True)


def test_no_break_space_thousands_are_reported_as_they_are() -> None:
    dialect = sniff_dialect("lot;kg\nA;1\u00a0234,5\nB;12\u00a0000,25\n", complete=True)
    assert (dialect.decimal, dialect.thousands) == (",", "\u00a0")


def test_declared_delimiter() -> None:
    assert declared_delimiter("sep=;\na;b\n") == ";"
    assert declared_delimiter("sep=\t\r\na\tb\n") == "\t"
    assert declared_delimiter("separator,b\n") is None
