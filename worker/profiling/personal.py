"""Columns that look like personal data, and masking of their sample values.

A partner's file may carry e-mail addresses, phone numbers, bank account
numbers (IBAN), payment card numbers or network addresses. ``detect_personal``
looks at a bounded sample of a text column's values and returns the share that
match each kind; the column's profile keeps the best one as
``column["personal"]`` and the judgement raises ``privacy.personal-data`` from
it. ``mask_value`` and ``mask_profile`` hide such values wherever a profile is
shown.

The shape tests run vectorised with ``pyarrow.compute`` regular expressions
(RE2 syntax); the check digits (IBAN mod-97, Luhn) are computed only for the
values that already have the right shape.

References: ISO 13616-1:2020 (IBAN structure and the ISO 7064 MOD 97-10 check);
ISO/IEC 7812-1 (card numbers, Luhn check digit); ITU-T E.164 (international
phone numbers: "+", country code, at most 15 digits); RFC 5321 / RFC 5322
(the shape of an address, reduced here to local@domain.tld); RFC 791 and
RFC 4291 (IPv4 and IPv6 text forms, checked with Python's ``ipaddress``).
"""

from __future__ import annotations

import ipaddress
import re
from collections.abc import Iterable, Sequence
from typing import Any, Literal

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

PersonalKind = Literal["email", "phone", "iban", "card", "ip"]

KINDS: tuple[PersonalKind, ...] = ("email", "phone", "iban", "card", "ip")
"""Every kind the detector knows, in the order ties are broken."""

DEFAULT_SAMPLE = 2000
"""Values looked at per column: enough for a share to within about ±2 points (common practice)."""

DEFAULT_MIN_SHARE = 0.5
"""Share of matching values from which a column is said to hold that kind (common practice)."""

# Shapes, anchored, on the trimmed value. RE2 has no look-around, so each is a plain pattern.
_DOMAIN_LABEL = r"[A-Za-z0-9](?:[A-Za-z0-9-]*[A-Za-z0-9])?"
_EMAIL = (
    r"^[A-Za-z0-9.!#$%&'*+/=?^_`{|}~-]+@"
    + _DOMAIN_LABEL
    + r"(?:\."
    + _DOMAIN_LABEL
    + r")*\.[A-Za-z]{2,}$"
)
# E.164: "+", a country code not starting with 0, 8 to 15 digits in all, with optional
# spaces, dots, dashes or parentheses between groups.
_PHONE_INTERNATIONAL = r"^(?:\+|00)[1-9][0-9 .()/-]{6,20}[0-9]$"
# National forms: a trunk prefix 0 followed by separated groups (most of Europe, Oceania),
# or the North American 3-3-4 form. Plain runs of digits are left out on purpose: they
# are far more often identifiers than phone numbers.
_PHONE_NATIONAL = r"^\(?0[1-9][0-9]{0,4}\)?(?:[ .-]+[0-9]{2,4}){2,4}$"
_PHONE_NANP = r"^(?:\+?1[ .-]?)?\(?[2-9][0-9]{2}\)?[ .-]?[2-9][0-9]{2}[ .-][0-9]{4}$"
# IBAN: country letters, two check digits, up to 30 letters or digits, grouped by spaces.
_IBAN = r"^[A-Za-z]{2}[0-9]{2}(?: ?[A-Za-z0-9]){11,30}$"
# Card: 13 to 19 digits, optionally in groups separated by single spaces or dashes.
_CARD = r"^[0-9](?:[ -]?[0-9]){12,18}$"
_OCTET = r"(?:25[0-5]|2[0-4][0-9]|1[0-9]{2}|[1-9]?[0-9])"
_IPV4 = rf"^(?:{_OCTET}\.){{3}}{_OCTET}$"
_IPV6_CANDIDATE = r"^[0-9A-Fa-f:.]*:[0-9A-Fa-f:.]*$"

_NON_DIGITS = re.compile(r"[^0-9]")


def iban_is_valid(text: str) -> bool:
    """True when ``text`` is an IBAN whose check digits hold (ISO 13616, ISO 7064 MOD 97-10).

    Spaces are ignored and letters may be of either case. The four first
    characters move to the end, letters become 10..35, and the resulting number
    must leave remainder 1 when divided by 97.

    References: ISO 13616-1:2020, section 6; ISO/IEC 7064:2003 MOD 97-10.
    """
    compact = text.replace(" ", "").upper()
    if not 15 <= len(compact) <= 34 or not compact.isascii() or not compact.isalnum():
        return False
    if not (compact[:2].isalpha() and compact[2:4].isdigit()):
        return False
    rearranged = compact[4:] + compact[:4]
    digits = "".join(str(int(ch, 36)) for ch in rearranged)
    return int(digits) % 97 == 1


def luhn_is_valid(text: str) -> bool:
    """True when the digits of ``text`` (13 to 19 of them) pass the Luhn check.

    Non-digits (spaces, dashes) are ignored. From the rightmost digit, every
    second digit is doubled (minus 9 when above 9); the sum must end in 0.

    References: ISO/IEC 7812-1:2017, Annex B (the Luhn formula); H. P. Luhn,
    US patent 2,950,048 (1960).
    """
    digits = _NON_DIGITS.sub("", text)
    if not 13 <= len(digits) <= 19:
        return False
    return bool(_luhn_ok(np.frombuffer(digits.encode("ascii"), dtype=np.uint8) - 48))


def _luhn_ok(digits: np.ndarray) -> bool:
    doubled = digits[::-1].astype(np.int64)
    doubled[1::2] *= 2
    doubled[doubled > 9] -= 9
    return int(doubled.sum()) % 10 == 0


def _ip_is_valid(text: str) -> bool:
    try:
        ipaddress.ip_address(text)
    except ValueError:
        return False
    return True


def _as_text_array(values: pa.Array | pa.ChunkedArray | Iterable[str | None]) -> pa.Array:
    if isinstance(values, pa.ChunkedArray):
        values = values.combine_chunks()
    if not isinstance(values, pa.Array):
        values = pa.array(list(values), type=pa.string())
    if not (pa.types.is_string(values.type) or pa.types.is_large_string(values.type)):
        values = values.cast(pa.string())
    return values


def _matches(texts: pa.Array, pattern: str) -> np.ndarray:
    hit = pc.match_substring_regex(texts, pattern)
    return np.asarray(pc.fill_null(hit, False).to_numpy(zero_copy_only=False), dtype=bool)


def _confirm(texts: pa.Array, shaped: np.ndarray, check: Any) -> np.ndarray:
    """Run a Python check only over the values whose shape already matched."""
    confirmed = np.zeros(len(texts), dtype=bool)
    for index in np.flatnonzero(shaped):
        confirmed[index] = check(texts[int(index)].as_py())
    return confirmed


def match_kinds(
    values: pa.Array | pa.ChunkedArray | Iterable[str | None],
) -> dict[PersonalKind, np.ndarray]:
    """For each kind, a boolean per value: does the trimmed value look like that kind?

    Missing values never match. Useful on its own for tests and for showing
    which rows matched; ``detect_personal`` turns it into shares.
    """
    texts = pc.utf8_trim_whitespace(_as_text_array(values))
    digit_count = pc.utf8_length(pc.replace_substring_regex(texts, r"[^0-9]", ""))
    digits = np.asarray(pc.fill_null(digit_count, 0).to_numpy(zero_copy_only=False))
    # E.164 allows at most 15 digits (a "00" prefix adds two); national numbers with their
    # trunk 0 have 9 to 12, which keeps dates such as 01-02-2024 out.
    phone = (
        (_matches(texts, _PHONE_INTERNATIONAL) & (digits >= 8) & (digits <= 17))
        | (_matches(texts, _PHONE_NATIONAL) & (digits >= 9) & (digits <= 12))
        | _matches(texts, _PHONE_NANP)
    )
    card = _confirm(texts, _matches(texts, _CARD), luhn_is_valid)
    return {
        "email": _matches(texts, _EMAIL),
        "phone": phone & ~card,
        "iban": _confirm(texts, _matches(texts, _IBAN), iban_is_valid),
        "card": card,
        "ip": _matches(texts, _IPV4)
        | _confirm(texts, _matches(texts, _IPV6_CANDIDATE), _ip_is_valid),
    }


def detect_personal(
    values: pa.Array | pa.ChunkedArray | Sequence[str | None],
    *,
    sample: int = DEFAULT_SAMPLE,
    min_share: float = DEFAULT_MIN_SHARE,
) -> dict[str, Any] | None:
    """Say whether a text column looks like personal data, and how much of it does.

    Looks at the first ``sample`` non-missing values (a delivered file's order
    is arbitrary, so the head is as good a sample as any and stays cheap).
    Returns ``{"kind", "share", "checked", "shares"}`` for the kind with the
    largest share of matching values when that share reaches ``min_share``,
    else None. ``shares`` lists every kind with at least one match, so a
    column mixing e-mail addresses and phone numbers shows both.
    """
    texts = _as_text_array(values)
    texts = pc.drop_null(texts)
    blank = _matches(texts, r"^\s*$")
    if blank.any():
        texts = pc.filter(texts, pa.array(~blank))
    texts = texts.slice(0, sample)
    checked = len(texts)
    if checked == 0:
        return None
    hits = match_kinds(texts)
    shares = {kind: float(hits[kind].sum()) / checked for kind in KINDS if hits[kind].any()}
    if not shares:
        return None
    best = max(KINDS, key=lambda kind: shares.get(kind, 0.0))
    if shares[best] < min_share:
        return None
    return {
        "kind": best,
        "share": round(shares[best], 4),
        "checked": checked,
        "shares": {kind: round(share, 4) for kind, share in shares.items()},
    }


# ---------------------------------------------------------------------------
# Masking

MASK = "*"


def _mask_digits(text: str, keep_last: int) -> str:
    """Replace every digit but the last ``keep_last`` by the mask, keeping separators."""
    positions = [i for i, ch in enumerate(text) if ch.isdigit()]
    hidden = set(positions[: max(len(positions) - keep_last, 0)])
    return "".join(MASK if i in hidden else ch for i, ch in enumerate(text))


def _mask_email(text: str) -> str:
    local, _, domain = text.rpartition("@")
    labels = domain.split(".")
    top = labels[-1] if len(labels) > 1 else ""
    host = labels[0] if labels else ""
    masked_domain = (host[:1] + MASK * 3) + (f".{top}" if top else "")
    return f"{local[:1]}{MASK * 3}@{masked_domain}"


def _mask_iban(text: str) -> str:
    compact = text.replace(" ", "")
    kept = compact[:2] + MASK * max(len(compact) - 6, 0) + compact[-4:]
    return " ".join(kept[i : i + 4] for i in range(0, len(kept), 4))


def _mask_ip(text: str) -> str:
    if ":" in text:
        head = text.split(":", 1)[0]
        return f"{head}:{MASK * 4}"
    head = text.split(".", 1)[0]
    return f"{head}.{MASK}.{MASK}.{MASK}"


def mask_value(value: Any, kind: str | None = None) -> Any:
    """A value with its personal part hidden; non-text values come back unchanged.

    e-mail ``ada@example.org`` → ``a***@e***.org``; card → every digit but the
    last four hidden; phone → every digit but the last two; IBAN → country
    letters and the last four characters; IP → first group only. An unknown
    kind keeps the first character and hides the rest.
    """
    if not isinstance(value, str) or value == "":
        return value
    text = value.strip()
    if kind is None:
        kind = next((k for k, hit in match_kinds([text]).items() if hit[0]), None)
    masked = text
    if kind == "email" and "@" in text:
        masked = _mask_email(text)
    elif kind == "card":
        masked = _mask_digits(text, keep_last=4)
    elif kind == "phone":
        masked = _mask_digits(text, keep_last=2)
    elif kind == "iban" and len(text.replace(" ", "")) > 6:
        masked = _mask_iban(text)
    elif kind == "ip" and ("." in text or ":" in text):
        masked = _mask_ip(text)
    if masked == text or kind not in KINDS:
        # Not of the column's kind (a stray value) or of no known kind: hide all but one letter.
        masked = text[:1] + MASK * min(max(len(text) - 1, 3), 8)
    return masked


# Keys whose strings are structure (field names, codes), not delivered values.
_STRUCTURAL_KEYS = frozenset(
    {
        "name",
        "kind",
        "method",
        "a",
        "b",
        "personal",
        "code",
        "severity",
        "message",
        "hint",
        "pattern",
    }
)
# Keys under which mappings are keyed by delivered labels (e.g. a crosstab's counts).
_LABEL_KEYED = frozenset({"counts", "residuals", "row_shares", "column_shares", "expected"})


def _mask_tree(node: Any, kind: str | None, *, label_keys: bool = False) -> Any:
    """Mask every delivered string in a nested profile fragment.

    String leaves are masked; mapping keys are masked too below the keys of
    ``_LABEL_KEYED``, where they are labels of the file rather than field names.
    """
    if isinstance(node, str):
        return mask_value(node, kind)
    if isinstance(node, list):
        return [_mask_tree(item, kind, label_keys=label_keys) for item in node]
    if isinstance(node, dict):
        out: dict[Any, Any] = {}
        for key, value in node.items():
            if key in _STRUCTURAL_KEYS and not label_keys:
                out[key] = value
                continue
            new_key = mask_value(key, kind) if label_keys else key
            out[new_key] = _mask_tree(value, kind, label_keys=label_keys or key in _LABEL_KEYED)
        return out
    return node


# Parts of a column document that can hold delivered values (labels, examples).
_COLUMN_VALUE_KEYS = (
    "labels",
    "samples",
    "examples",
    "text",
    "suspected_sentinels",
    "kind_evidence",
)


def mask_column(column: dict[str, Any]) -> dict[str, Any]:
    """A copy of a profile column with its delivered values masked, when it holds personal data."""
    personal = column.get("personal")
    if not personal:
        return column
    kind = personal.get("kind")
    masked = dict(column)
    for key in _COLUMN_VALUE_KEYS:
        if key in masked:
            masked[key] = _mask_tree(masked[key], kind)
    return masked


def personal_columns(profile: dict[str, Any]) -> dict[str, str]:
    """Names of the profile's columns that hold personal data, with their kind."""
    return {
        column["name"]: column["personal"]["kind"]
        for column in profile.get("columns", [])
        if column.get("personal")
    }


def _mask_crosstab(table: dict[str, Any], kinds: dict[str, str]) -> dict[str, Any]:
    """A crosstab with the labels of its personal side(s) masked, each by its own kind."""
    kind_a, kind_b = kinds.get(table.get("a")), kinds.get(table.get("b"))
    if kind_a is None and kind_b is None:
        return table
    counts = table.get("counts")
    if isinstance(counts, dict) and ("a_labels" in counts or "b_labels" in counts):
        counts = dict(counts)
        for side, kind in (("a_labels", kind_a), ("b_labels", kind_b)):
            if kind is not None and side in counts:
                counts[side] = [mask_value(label, kind) for label in counts[side]]
        return {**table, "counts": counts}
    return _mask_tree(table, kind_a or kind_b)


def mask_profile(profile: dict[str, Any]) -> dict[str, Any]:
    """A copy of a profile document in which personal columns' sample values are masked.

    Covers the columns' label counts, variants and samples, and the crosstabs
    and flags' evidence that involve those columns. Column names, counts and
    statistics stay as they are: they describe the file, not a person.
    """
    kinds = personal_columns(profile)
    if not kinds:
        return profile
    masked = dict(profile)
    masked["columns"] = [mask_column(column) for column in profile.get("columns", [])]
    masked["crosstabs"] = [_mask_crosstab(t, kinds) for t in profile.get("crosstabs", []) or []]
    flags = []
    for flag in profile.get("flags", []) or []:
        involved = [kinds[name] for name in flag.get("columns", []) if name in kinds]
        if involved and flag.get("evidence"):
            flag = {**flag, "evidence": _mask_tree(flag["evidence"], involved[0])}
        flags.append(flag)
    masked["flags"] = flags
    masked["masked"] = sorted(kinds)
    return masked


class PersonalSample:
    """The first ``size`` non-missing values of a text column, kept for ``detect_personal``.

    Mergeable like the other column states: merging keeps the values of the
    earlier rows first, so a file profiled in chunks checks the same values as
    one profiled whole (when chunks are merged in row order).
    """

    def __init__(self, size: int = DEFAULT_SAMPLE) -> None:
        self.size = size
        self.values: list[str] = []

    @property
    def full(self) -> bool:
        return len(self.values) >= self.size

    def update(self, raw: pa.Array, missing: np.ndarray | None = None) -> None:
        """Add values of one batch (``missing``: True where the cell counts as missing)."""
        if self.full or not (pa.types.is_string(raw.type) or pa.types.is_large_string(raw.type)):
            return
        if missing is not None and missing.any():
            raw = pc.filter(raw, pa.array(~missing))
        raw = pc.drop_null(raw)
        room = self.size - len(self.values)
        self.values.extend(raw.slice(0, room).to_pylist())

    def merge(self, other: PersonalSample) -> PersonalSample:
        out = PersonalSample(self.size)
        out.values = (self.values + other.values)[: self.size]
        return out

    def finalize(self, min_share: float = DEFAULT_MIN_SHARE) -> dict[str, Any] | None:
        """What ``detect_personal`` finds in the kept values (None for no personal data)."""
        return detect_personal(self.values, sample=self.size, min_share=min_share)
