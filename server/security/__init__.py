"""Security of the service: passwords, sessions, CSRF, throttling, headers, exports, paths.

Each module holds one concern as small pure functions (or one ASGI middleware);
the database side of accounts lives in ``server.store.accounts`` and the one
place that decides who the current user is lives in ``server.api.deps``.
"""
