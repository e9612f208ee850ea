"""The password rule (``planner.records.passwords``) against NIST SP 800-63B section 5.1.1.2 (revision 3):
at least 8 characters (the project asks 10), compared with "values known to be commonly-used,
expected, or compromised": breach corpuses, "repetitive or sequential characters (e.g. 'aaaaaa',
'1234abcd')", "context-specific words, such as ... the username, and derivatives thereof"; and "SHOULD
NOT impose other composition rules".  The common list is zxcvbn's password list, checked here against
the library itself (``zxcvbn.frequency_lists``: 30,000 entries, ``password12`` among them).
"""

from __future__ import annotations

import pytest
from zxcvbn.frequency_lists import FREQUENCY_LISTS

from planner.records.accounts import AccountBook
from planner.records.passwords import PASSWORD_MIN, check_password, common_passwords
from planner.records.store import PlanStore, StoreError


@pytest.mark.parametrize("password, name, words", [
    ("aaaaaaaaaa", "ana", "password: a repeated or sequential pattern"),
    (" " * 10, "ana", "password: only spaces"),
    ("password12", "ana", "password: a common password"),
    ("PassWord12", "ana", "password: a common password"),            # case does not save it
    ("sunshine2024!", "ana", "password: a common password"),         # a common one with digits after it
    ("alex.morgan", "alex.morgan", "password: it is the account's name"),
    ("Alex Morgan 1984", "alex.morgan", "password: it is the account's name"),
    ("abcabcabcabc", "ana", "password: a repeated or sequential pattern"),
    ("abcdefghijk", "ana", "password: a repeated or sequential pattern"),
    ("9876543210", "ana", "password: a repeated or sequential pattern"),
    ("short-one", "ana", f"password: 9 characters, at least {PASSWORD_MIN}"),
])
def test_weak_passwords_are_refused_naming_the_field_and_the_rule(password, name, words):
    with pytest.raises(StoreError, match=words) as refused:
        check_password(password, name)
    message = str(refused.value)
    assert message.startswith("password: ")
    if "characters, at least" not in message:
        assert "NIST SP 800-63B" in message
    if password.strip():
        assert password not in message                              # a password is never repeated back


@pytest.mark.parametrize("password", [
    "correct horse battery staple",     # a passphrase of words: no composition rule asks for more
    "tide-at-wren-quay",
    "ana-password-1",                   # the name inside a longer phrase is not the name
    "ÄÖÜ ßéèñ 水位計",                  # Unicode counted as code points (8 letters, 2 spaces)
    "1qaz-wren-7",
])
def test_passwords_without_composition_rules_are_accepted(password):
    assert check_password(password, "ana") == password


def test_the_common_list_is_the_librarys():
    listed = FREQUENCY_LISTS["passwords"]
    assert len(listed) == 30_000 and "password12" in listed
    assert common_passwords() == {w.lower() for w in listed}


def test_accounts_keep_the_rule_when_made_and_when_the_password_changes(tmp_path):
    store = PlanStore(tmp_path / "plans.sqlite")
    book = AccountBook(store)
    with pytest.raises(StoreError, match="password: it is the account's name"):
        book.add("supervisor1", "admin", "supervisor1")
    root = book.add("root", "admin", "root-password-1")
    for weak, words in (("aaaaaaaaaa", "repeated"), ("password12", "common"), (" " * 10, "only spaces"),
                        ("pat.jones-77", "account's name")):
        with pytest.raises(StoreError, match=words):
            book.add("pat.jones", "planner", weak, by=root)
    for weak, words in (("aaaaaaaaaa", "repeated"), ("password12", "common"), ("Root 2024!!", "account's name")):
        with pytest.raises(StoreError, match=words):
            book.set_password("root", weak, by=root, current_password="root-password-1")
    assert [a.name for a in book.list()] == ["root"]
    assert book.authenticate("root", "root-password-1").name == "root"
    store.close()
