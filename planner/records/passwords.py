"""The password rule: what a new password must be (NIST SP 800-63B, section 5.1.1.2).

A password is refused, with a message naming the rule, when it is

- shorter than ``PASSWORD_MIN`` (10) characters, counted as Unicode code points, or longer than
  ``PASSWORD_MAX`` (256); NIST asks at least 8 and at least 64 allowed;
- a common password: ignoring case, one of the 30,000 most common passwords of the list the zxcvbn
  password-strength library ships (``COMMON_SOURCE``), or one of them with only digits, spaces or
  punctuation before or after it (``sunshine2024!``);
- repetitive or sequential: one character, or a group of up to four, repeated (``aaaaaaaaaa``, ten
  spaces, ``abcabcabca``), or a run of consecutive characters (``abcdefghij``, ``9876543210``);
- the account's own name, ignoring case, spaces and punctuation, possibly with digits before or
  after it (NIST: "context-specific words, such as the username, and derivatives thereof").

There are no composition rules (no "one digit, one capital"): NIST SP 800-63B says verifiers should
not impose them.  Ten characters, not NIST's minimum of 8: sign-in is single-factor here, and the
two extra characters multiply an offline guesser's work by about 10^4 for a random passphrase,
while staying short enough to type on a plant-room keyboard; the online guesser is held off by the
throttling in ``planner.records.throttle``.  (The 2024 revision, SP 800-63B-4, asks 15 for
single-factor passwords; a site that wants that changes ``PASSWORD_MIN``.)
"""

from __future__ import annotations

import functools

from planner.records.terms import StoreError

PASSWORD_MIN, PASSWORD_MAX = 10, 256
RULE = "NIST SP 800-63B"
COMMON_SOURCE = ("the 30,000 most common passwords of the zxcvbn library's password list "
                 "(zxcvbn on PyPI, MIT licence; Dropbox's list drawn from a public set of 10 million leaked passwords)")
_AROUND = "0123456789 .,;:!?_-+*#@$%&/\\|'\"`~^=()[]{}<>"


@functools.lru_cache(maxsize=1)
def common_passwords() -> frozenset[str]:
    """The common-password list, lower case (loaded on first use: 30,000 entries)."""
    from zxcvbn.frequency_lists import FREQUENCY_LISTS

    return frozenset(word.lower() for word in FREQUENCY_LISTS["passwords"])


def _is_pattern(password: str) -> bool:
    """A group of up to four characters repeated, or a run of consecutive characters up or down."""
    n = len(password)
    for unit in range(1, 5):
        if n >= 2 * unit and (password[:unit] * (n // unit + 1))[:n] == password:
            return True
    steps = {ord(b) - ord(a) for a, b in zip(password, password[1:])}
    return steps in ({1}, {-1})


def _letters_and_digits(text: str) -> str:
    return "".join(c for c in text.casefold() if c.isalnum())


def _is_name(password: str, name: str) -> bool:
    core, own = _letters_and_digits(password), _letters_and_digits(name)
    if not own or own not in core:
        return False
    start = core.index(own)
    return (core[:start] + core[start + len(own):]).isdigit() or core == own


def check_password(password, name: str = "") -> str:
    """``password`` if it keeps the rule (module docstring); else StoreError naming the field and the rule.
    ``name`` is the account's name.  The password itself is never repeated in a message."""
    if not isinstance(password, str) or not password:
        raise StoreError("password: empty")
    if "\x00" in password:
        raise StoreError("password: contains a NUL character")
    if len(password) < PASSWORD_MIN:
        raise StoreError(f"password: {len(password)} characters, at least {PASSWORD_MIN}")
    if len(password) > PASSWORD_MAX:
        raise StoreError(f"password: longer than {PASSWORD_MAX} characters")
    if not password.strip():
        raise StoreError(f"password: only spaces; a password of spaces alone is among the first guessed ({RULE})")
    if _is_pattern(password):
        raise StoreError(f"password: a repeated or sequential pattern (one character or a short group repeated, or "
                         f"a run such as abcd… or 9876…) is among the first guessed; choose another ({RULE})")
    if name and _is_name(password, name):
        raise StoreError(f"password: it is the account's name (perhaps with digits, capitals or punctuation); "
                         f"choose one that does not derive from the name ({RULE})")
    lowered = password.casefold()
    if lowered in common_passwords() or lowered.strip(_AROUND) in common_passwords():
        raise StoreError(f"password: a common password (one of the 30,000 most common, perhaps with digits or "
                         f"symbols around it); choose another ({RULE})")
    return password
