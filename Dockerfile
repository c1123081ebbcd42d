# One image for the server and the workers of the team deployment (docker-compose.yml).
FROM python:3.11-slim

ENV PYTHONDONTWRITEBYTECODE=1 PYTHONUNBUFFERED=1 PIP_NO_CACHE_DIR=1
WORKDIR /app
# A C compiler for the engine's compiled passes (worker/profiling/native), built by pip.
RUN apt-get update && apt-get install -y --no-install-recommends gcc libc6-dev \
    && rm -rf /var/lib/apt/lists/*
RUN useradd --create-home --uid 10001 tidewaiter \
    && mkdir -p /var/lib/tidewaiter && chown tidewaiter /var/lib/tidewaiter

COPY pyproject.toml README.md LICENSE alembic.ini ./
COPY server ./server
COPY worker ./worker
COPY web ./web
COPY migrations ./migrations
# Editable, so the migrations and templates are found beside the code.
RUN pip install -e .

USER tidewaiter
EXPOSE 8000
CMD ["tidewaiter", "serve", "--host", "0.0.0.0"]
