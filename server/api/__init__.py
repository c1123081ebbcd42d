"""The HTTP API: one router per resource under ``/api/v1``, health at the root."""

from fastapi import APIRouter

from server.api.routes import health, intakes, suppliers

API_PREFIX = "/api/v1"

api_router = APIRouter(prefix=API_PREFIX)
api_router.include_router(intakes.router)
api_router.include_router(suppliers.router)

health_router = health.router

__all__ = ["API_PREFIX", "api_router", "health_router"]
