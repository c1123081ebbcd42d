"""Personal-data detectors and masking, checked against published examples and python-stdnum."""

from __future__ import annotations

import numpy as np
import pyarrow as pa
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from stdnum import iban as stdnum_iban
from stdnum import luhn as stdnum_luhn

from worker.profiling.personal import (
    PersonalSample,
    detect_personal,
    iban_is_valid,
    luhn_is_valid,
    mask_profile,
    mask_value,
    match_kinds,
)

# Example IBANs printed in the ISO 13616 documentation and national banking guides,
# recalled from memory (each also passes python-stdnum's independent check below).
PUBLISHED_IBANS = [
    "GB82 WEST 1234 5698 7654 32",
    "GB82WEST12345698765432",
    "DE89 3704 0044 0532 0130 00",
    "FR14 2004 1010 0505 0001 3M02 606",
]

# The card numbers card networks publish for testing payment forms, recalled from memory.
TEST_CARDS = [
    "4111 1111 1111 1111",
    "5555 5555 5555 4444",
    "3782 822463 10005",
    "6011-1111-1111-1117",
    "4012888888881881",
]


@pytest.mark.parametrize("text", PUBLISHED_IBANS)
def test_published_example_ibans_pass_mod_97(text: str) -> None:
    assert stdnum_iban.is_valid(text)  # python-stdnum agrees: the example is valid
    assert iban_is_valid(text)


@pytest.mark.parametrize(
    "text",
    [
        "GB82 WEST 1234 5698 7654 33",  # last digit changed
        "GB28 WEST 1234 5698 7654 32",  # check digits swapped
        "GB82 WEST 1234 5698 7654",  # too short
        "8282 WEST 1234 5698 7654 32",  # no country letters
        "GB82 WÉST 1234 5698 7654 32",  # not ASCII
    ],
)
def test_altered_ibans_are_refused(text: str) -> None:
    assert not stdnum_iban.is_valid(text)  # python-stdnum agrees: invalid
    assert not iban_is_valid(text)


@pytest.mark.parametrize("text", TEST_CARDS)
def test_published_test_card_numbers_pass_luhn(text: str) -> None:
    assert stdnum_luhn.is_valid(text.replace(" ", "").replace("-", ""))  # python-stdnum agrees
    assert luhn_is_valid(text)


def test_luhn_worked_example() -> None:
    # 79927398713 is the worked example of the Luhn formula in its usual descriptions
    # (recalled from memory); leading zeros do not change the check, so pad to 13 digits.
    assert luhn_is_valid("0079927398713")
    assert not luhn_is_valid("0079927398710")


@given(st.text(alphabet="0123456789", min_size=13, max_size=19))
@settings(max_examples=300, deadline=None)
def test_luhn_agrees_with_python_stdnum(digits: str) -> None:
    assert luhn_is_valid(digits) == stdnum_luhn.is_valid(digits)  # reference: python-stdnum


@given(
    st.text(alphabet="ABCDEFGHIJKLMNOPQRSTUVWXYZ", min_size=2, max_size=2),
    st.text(alphabet="0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZ", min_size=11, max_size=30),
)
@settings(max_examples=300, deadline=None)
def test_iban_checksum_agrees_with_python_stdnum(country: str, bban: str) -> None:
    # python-stdnum computes the check digits (ignoring the country's registered length);
    # our check must accept the result and refuse every other pair of check digits.
    check = stdnum_iban.calc_check_digits(f"{country}00{bban}")  # reference: python-stdnum
    assert iban_is_valid(f"{country}{check}{bban}")
    wrong = f"{(int(check) + 1) % 100:02d}"
    assert not iban_is_valid(f"{country}{wrong}{bban}")


@given(st.integers(min_value=4, max_value=21), st.integers(min_value=1, max_value=9))
def test_iban_single_digit_substitution_is_caught(position: int, delta: int) -> None:
    # MOD 97-10 detects every single substitution error (ISO 7064; 97 is prime).
    compact = "GB82WEST12345698765432"
    if not compact[position].isdigit():
        return
    changed = str((int(compact[position]) + delta) % 10)
    assert not iban_is_valid(compact[:position] + changed + compact[position + 1 :])


def test_detects_each_kind_with_its_share() -> None:
    # Planted by construction: three of four values are the kind, one is not.
    cases = {
        "email": ["ada@example.org", "b.lee@mail.example.co.uk", "c+tag@example.net", "nope"],
        "phone": ["+44 20 7946 0958", "020 7946 0958", "(212) 555-0143", "hello"],
        "iban": [*PUBLISHED_IBANS[:3], "GB82 WEST 1234 5698 7654 33"],
        "card": [*TEST_CARDS[:3], "4111 1111 1111 1112"],
        "ip": ["192.0.2.1", "2001:db8::1", "::1", "10.0.0.256"],
    }
    for kind, values in cases.items():
        found = detect_personal(values)
        assert found is not None, kind
        assert found["kind"] == kind
        assert found["share"] == pytest.approx(0.75)
        assert found["checked"] == 4


def test_missing_and_blank_values_do_not_count() -> None:
    found = detect_personal(pa.array(["ada@example.org", None, "  ", "", "bo@example.org"]))
    assert found == {"kind": "email", "share": 1.0, "checked": 2, "shares": {"email": 1.0}}


def test_ordinary_columns_are_not_personal() -> None:
    assert detect_personal(["north", "south", "east", "west"]) is None
    assert detect_personal(["12", "7", "301", "4.5"]) is None
    # Dates and plain identifiers share digits with phones but not their shape.
    assert detect_personal(["01-02-2024", "15.03.2023", "2024-01-31"]) is None
    assert detect_personal(["0612345678", "0123456789"]) is None
    assert detect_personal([None, None]) is None


def test_below_the_share_threshold_is_not_reported() -> None:
    values = ["ada@example.org"] + ["plain"] * 9
    assert detect_personal(values) is None
    found = detect_personal(values, min_share=0.1)
    assert found is not None and found["share"] == pytest.approx(0.1)


def test_sample_bounds_the_values_checked() -> None:
    values = ["ada@example.org"] * 50 + ["plain"] * 50
    found = detect_personal(values, sample=10)
    assert found is not None and found["checked"] == 10 and found["share"] == 1.0


def test_a_mixed_column_reports_every_kind() -> None:
    found = detect_personal(["ada@example.org", "bo@example.org", "+44 20 7946 0958"])
    assert found is not None and found["kind"] == "email"
    assert set(found["shares"]) == {"email", "phone"}


def test_card_numbers_are_not_also_phones() -> None:
    hits = match_kinds(["4111 1111 1111 1111"])
    assert hits["card"][0] and not hits["phone"][0]


@pytest.mark.parametrize(
    ("value", "kind", "masked"),
    [
        ("ada@example.org", "email", "a***@e***.org"),
        ("4111 1111 1111 1111", "card", "**** **** **** 1111"),
        ("+44 20 7946 0958", "phone", "+** ** **** **58"),
        ("GB82WEST12345698765432", "iban", "GB** **** **** **** **54 32"),
        ("192.0.2.1", "ip", "192.*.*.*"),
        ("2001:db8::1", "ip", "2001:****"),
        ("Zed", None, "Z***"),
    ],
)
def test_mask_value(value: str, kind: str | None, masked: str) -> None:
    assert mask_value(value, kind) == masked


def test_mask_value_leaves_non_text_alone() -> None:
    assert mask_value(42, "card") == 42
    assert mask_value(None, "email") is None


def test_mask_profile_hides_labels_samples_and_crosstab_keys() -> None:
    profile = {
        "columns": [
            {
                "name": "contact",
                "kind": "identifier",
                "personal": {"kind": "email", "share": 1.0},
                "labels": {"top": [{"value": "ada@example.org", "count": 3, "share": 0.5}]},
                "samples": ["bo@example.org"],
            },
            {"name": "region", "kind": "categorical", "labels": {"top": [{"value": "north"}]}},
        ],
        "crosstabs": [
            {"a": "region", "b": "contact", "counts": {"north": {"ada@example.org": 3}}},
        ],
        "flags": [
            {
                "code": "privacy.personal-data",
                "columns": ["contact"],
                "evidence": {"examples": ["ada@example.org"], "share": 1.0},
            }
        ],
    }
    masked = mask_profile(profile)
    text = repr(masked)
    assert "ada@example.org" not in text and "bo@example.org" not in text
    assert masked["columns"][0]["labels"]["top"][0] == {
        "value": "a***@e***.org",
        "count": 3,
        "share": 0.5,
    }
    assert masked["columns"][0]["name"] == "contact"
    assert masked["columns"][1] == profile["columns"][1]  # no personal data: untouched
    assert masked["crosstabs"][0]["a"] == "region"
    assert masked["masked"] == ["contact"]
    assert profile["columns"][0]["samples"] == ["bo@example.org"]  # the original is not changed


def test_mask_profile_without_personal_columns_is_the_same_document() -> None:
    profile = {"columns": [{"name": "x", "kind": "numeric"}]}
    assert mask_profile(profile) is profile


def test_personal_sample_keeps_the_first_present_values_and_merges_in_order() -> None:
    first, second = PersonalSample(size=4), PersonalSample(size=4)
    first.update(pa.array(["ada@example.org", None, "n/a"]), np.array([False, True, True]))
    second.update(pa.array(["bo@example.org", "cy@example.org", "di@example.org"]))
    merged = first.merge(second)
    assert merged.values == [
        "ada@example.org",
        "bo@example.org",
        "cy@example.org",
        "di@example.org",
    ]
    found = merged.finalize()
    assert found is not None and found["kind"] == "email" and found["checked"] == 4


def test_personal_sample_stops_at_its_size_and_ignores_typed_columns() -> None:
    sample = PersonalSample(size=2)
    sample.update(pa.array(["192.0.2.1", "192.0.2.2", "192.0.2.3"]))
    sample.update(pa.array(["192.0.2.4"]))
    assert sample.values == ["192.0.2.1", "192.0.2.2"]
    typed = PersonalSample()
    typed.update(pa.array([4111111111111111, 5555555555554444]))
    assert typed.values == [] and typed.finalize() is None


def test_mask_profile_masks_each_side_of_a_crosstab_by_its_own_kind() -> None:
    profile = {
        "columns": [
            {"name": "phone", "personal": {"kind": "phone"}},
            {"name": "lead", "personal": {"kind": "email"}},
            {"name": "shift"},
        ],
        "crosstabs": [
            {
                "a": "phone",
                "b": "lead",
                "counts": {"a_labels": ["+44 20 7946 0958"], "b_labels": ["lo@example.org"]},
            },
            {"a": "shift", "b": "lead", "counts": {"a_labels": ["early"], "b_labels": ["x@y.org"]}},
        ],
    }
    first, second = mask_profile(profile)["crosstabs"]
    assert first["counts"] == {"a_labels": ["+** ** **** **58"], "b_labels": ["l***@e***.org"]}
    assert second["counts"] == {"a_labels": ["early"], "b_labels": ["x***@y***.org"]}


def test_a_stray_value_of_another_kind_is_still_hidden() -> None:
    # A phone column with one e-mail address in it: the address has no digits to hide.
    assert mask_value("lo@example.org", "phone") == "l********"


_LOCAL = st.text(alphabet="abcdefghijklmnopqrstuvwxyz0123456789._", min_size=3, max_size=20)
_LABEL = st.text(alphabet="abcdefghijklmnopqrstuvwxyz", min_size=3, max_size=12)


@given(_LOCAL, _LABEL, st.sampled_from(["org", "net", "example"]))
@settings(max_examples=200, deadline=None)
def test_a_masked_address_keeps_neither_its_name_nor_its_domain(local, host, top) -> None:
    address = f"{local}@{host}.{top}"
    masked = mask_value(address, "email")
    # All that is left of the address: one letter of each name, and the top-level domain.
    assert masked == f"{local[0]}***@{host[0]}***.{top}"


@given(st.text(alphabet="0123456789", min_size=13, max_size=19))
@settings(max_examples=200, deadline=None)
def test_a_masked_card_shows_only_its_last_four_digits(digits: str) -> None:
    masked = mask_value(digits, "card")
    assert masked[-4:] == digits[-4:]
    assert set(masked[:-4]) == {"*"} and len(masked) == len(digits)
