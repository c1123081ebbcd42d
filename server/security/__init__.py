"""Security of the service: passwords, sessions, CSRF, throttling, headers, exports, paths.

Each module holds one concern as small pure functions (or one ASGI middleware).
The one place that decides who the caller is and what they may do is
``access`` (routes take it through ``server.api.deps``); ``setup`` puts the
middleware and refusal answers on the app; the database side of accounts
lives in ``server.store.accounts``.
"""
