"""Sign-in for the dashboard: the account panel in the sidebar and the account behind each save or
review step.

Planning, demos and share links need no sign-in; saving, submitting and reviewing do.  Signing in
goes through ``planner.records.accounts.AccountBook`` (Argon2id check, throttled failures); the
session's token lives in ``st.session_state["auth_token"]`` and is checked against the database on
every use, so an expired session, a sign-out or a disabled account takes effect at once, in every
dashboard server.  While the database holds no account at all, the panel offers to create the first
admin (README, "Accounts"); after that, accounts are managed by admins (the panel below) or with
``python -m planner users``.

The admin panel disables and enables accounts, changes roles and sets passwords (each recorded as an
account event by ``AccountBook``; the last active admin is kept); every signed-in account may change
its own password with its current one.

Session state used here: ``auth_token``, ``auth_msg`` and the form keys ``si_*``, ``fa_*``, ``ad_*``, ``pw_*``.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import logging

import streamlit as st

from planner.records.terms import ROLES, StoreError

from .store import store, store_exists

if TYPE_CHECKING:
    from planner.records.accounts import Account

log = logging.getLogger(__name__)

TOKEN_KEY = "auth_token"


def _book():
    from planner.records.accounts import AccountBook      # Argon2 and SQLAlchemy: only when an account is used

    return AccountBook(store())


def _say(kind: str, message: str) -> None:
    st.session_state["auth_msg"] = (kind, message)


def current_account() -> "Account | None":
    """The signed-in account, checked against the database now; None when nobody is signed in (or the
    session is over, which is then said in the panel)."""
    token = st.session_state.get(TOKEN_KEY)
    if not token:
        return None
    try:
        return _book().session(token)
    except StoreError as exc:
        st.session_state.pop(TOKEN_KEY, None)
        _say("warning", f"Signed out: {exc}")
        return None


def acting_account(what: str) -> "Account | None":
    """The account doing ``what`` (for a callback); None, with a message, when nobody is signed in."""
    account = current_account()
    if account is None:
        _say("error", f"Sign in to {what} (sidebar, “Account”).")
    return account


# ------------------------------------------------------------------------------------------ actions

def _do_sign_in() -> None:
    ss = st.session_state
    name, password = ss.get("si_name") or "", ss.get("si_password") or ""
    ss["si_password"] = ""
    try:
        session = _book().sign_in(name, password)
    except StoreError as exc:
        _say("error", f"Not signed in: {exc}")
        return
    ss[TOKEN_KEY] = session.token
    _say("success", "Signed in.")          # the panel says as whom, once


def _do_sign_out() -> None:
    token = st.session_state.pop(TOKEN_KEY, None)
    try:
        _book().sign_out(token)
    except StoreError:
        pass
    _say("info", "Signed out.")


def _do_first_admin() -> None:
    ss = st.session_state
    name, password, again = ss.get("fa_name") or "", ss.get("fa_password") or "", ss.get("fa_again") or ""
    ss["fa_password"] = ss["fa_again"] = ""
    if password != again:
        _say("error", "Not created: the two passwords differ.")
        return
    try:
        book = _book()
        book.add(name, "admin", password)          # refused once any account exists
        ss[TOKEN_KEY] = book.sign_in(name, password).token
    except StoreError as exc:
        _say("error", f"Not created: {exc}")
        return
    _say("success", f"Admin account {name.strip()!r} created; you are signed in. Add the planners and "
                    "supervisors below.")


def _do_add_account() -> None:
    ss = st.session_state
    admin = acting_account("add accounts")
    password = ss.get("ad_password") or ""
    ss["ad_password"] = ""
    if admin is None:
        return
    try:
        added = _book().add(ss.get("ad_name") or "", ss.get("ad_role") or "planner", password, by=admin)
    except StoreError as exc:
        _say("error", f"Not added: {exc}")
        return
    ss["ad_name"] = ""
    _say("success", f"Account {added.name!r} ({added.role}) added.")


def _admin_action(what: str, refused: str, act, done) -> None:
    """One administrator action: the signed-in admin (refused with why otherwise), ``act(book, admin)``,
    then ``done(result)`` as the success message or the store's refusal after ``refused``."""
    admin = acting_account(what)
    if admin is None:
        return
    try:
        result = act(_book(), admin)
    except StoreError as exc:
        _say("error", f"{refused}: {exc}")
        return
    _say("success", done(result))


def _do_disable(name: str) -> None:
    _admin_action("disable accounts", "Not disabled", lambda book, admin: book.disable(name, by=admin),
                  lambda _: f"Account {name!r} disabled; its revisions and review records keep its name.")


def _do_enable(name: str) -> None:
    _admin_action("enable accounts", "Not enabled", lambda book, admin: book.enable(name, by=admin),
                  lambda _: f"Account {name!r} enabled again.")


def _do_set_role() -> None:
    ss = st.session_state
    name, role = ss.get("ad_target") or "", ss.get("ad_new_role") or ""
    _admin_action("change roles", "Role not changed", lambda book, admin: book.set_role(name, role, by=admin),
                  lambda changed: f"Account {changed.name!r} is now a{'n' if changed.role[0] in 'aeiou' else ''} "
                                  f"{changed.role}.")


def _do_set_password() -> None:
    ss = st.session_state
    password = ss.get("ad_new_password") or ""
    ss["ad_new_password"] = ""          # cleared whatever happens
    name = ss.get("ad_target") or ""
    _admin_action("set passwords", "Password not set",
                  lambda book, admin: book.set_password(name, password, by=admin),
                  lambda _: f"New password set for {name!r}; its sign-ins have ended.")


def _do_change_own_password() -> None:
    ss = st.session_state
    me = acting_account("change your password")
    current, new, again = ss.get("pw_current") or "", ss.get("pw_new") or "", ss.get("pw_again") or ""
    ss["pw_current"] = ss["pw_new"] = ss["pw_again"] = ""
    if me is None:
        return
    if new != again:
        _say("error", "Password not changed: the two new passwords differ.")
        return
    try:
        book = _book()
        book.set_password(me.name, new, by=me, current_password=current)
        ss[TOKEN_KEY] = book.sign_in(me.name, new).token        # the change ended every sign-in, this one too
    except StoreError as exc:
        _say("error", f"Password not changed: {exc}")
        return
    _say("success", "Your password is changed; other sign-ins of your account have ended.")


# ------------------------------------------------------------------------------------------ layout

def _no_accounts_yet() -> bool:
    if not store_exists():          # a fresh install: do not create the plans file just to count
        return True
    return _book().count() == 0


def account_panel(container) -> "Account | None":
    """The sidebar's Account block; returns the signed-in account (or None)."""
    ss = st.session_state
    container.markdown("**Account**")
    try:
        account = current_account()
        empty = account is None and _no_accounts_yet()
    except StoreError as exc:
        container.error(f"Accounts are not available: {exc}")
        return None
    message = ss.pop("auth_msg", None)
    if message:
        getattr(container, message[0])(message[1])
    if account is not None:
        container.caption(f"Signed in as **{account.name}** ({account.role}).")
        container.button("Sign out", key="si_out", on_click=_do_sign_out)
        _own_password(container)
        if account.role == "admin":
            _admin_panel(container, account)
        return account
    if empty:
        container.caption("No accounts yet. Create the first admin here (offered only while no account exists), "
                          "or with `python -m planner users add NAME --role admin --password-stdin`.")
        container.text_input("Admin name", key="fa_name", max_chars=60)
        container.text_input("Password (at least 10 characters)", key="fa_password", type="password", max_chars=256)
        container.text_input("Password again", key="fa_again", type="password", max_chars=256)
        container.button("Create the first admin", key="fa_create", on_click=_do_first_admin)
        return None
    container.caption("Planning, demos and links need no sign-in; saving, submitting and reviewing do.")
    container.text_input("Account name", key="si_name", max_chars=60)
    container.text_input("Password", key="si_password", type="password", max_chars=256)
    container.button("Sign in", key="si_go", on_click=_do_sign_in)
    return None


def _own_password(container) -> None:
    with container.expander("Change my password"):
        st.text_input("Current password", key="pw_current", type="password", max_chars=256)
        st.text_input("New password (at least 10 characters)", key="pw_new", type="password", max_chars=256)
        st.text_input("New password again", key="pw_again", type="password", max_chars=256)
        st.button("Change my password", key="pw_change", on_click=_do_change_own_password)


def _admin_panel(container, me: Account) -> None:
    with container.expander("Accounts (admin)"):
        try:
            people = _book().list()
        except StoreError as exc:
            st.error(str(exc))
            return
        for person in people:
            left, right = st.columns([3, 1])
            status = "disabled" if person.disabled_at else "active"
            left.caption(f"{person.name} — {person.role}, {status}")
            if person.disabled_at is not None:
                right.button("Enable", key=f"ad_enable|{person.name}", on_click=_do_enable, args=(person.name,))
            elif person.name != me.name:
                right.button("Disable", key=f"ad_disable|{person.name}", on_click=_do_disable, args=(person.name,))
        st.markdown("**Change an account**")
        st.selectbox("Account", [p.name for p in people], key="ad_target")
        st.selectbox("New role", list(ROLES), key="ad_new_role")
        st.button("Set role", key="ad_set_role", on_click=_do_set_role)
        st.text_input("New password for it (at least 10 characters)", key="ad_new_password", type="password",
                      max_chars=256)
        st.button("Set password", key="ad_set_password", on_click=_do_set_password)
        st.markdown("**Add an account**")
        st.text_input("New account name", key="ad_name", max_chars=60)
        st.selectbox("Role", [r for r in ROLES], key="ad_role")
        st.text_input("Its password (at least 10 characters)", key="ad_password", type="password", max_chars=256)
        st.button("Add account", key="ad_add", on_click=_do_add_account)
