# Buffering reverse proxy for coolmargin: Debian's nginx with docker/nginx.conf, as a non-root user.
# Build from the repository root (docker/compose.yaml does): docker build -f docker/nginx.Dockerfile .
FROM debian:bookworm-slim

RUN apt-get update \
    && apt-get install --yes --no-install-recommends nginx \
    && rm -rf /var/lib/apt/lists/* \
    && useradd --create-home --uid 10002 proxy-runner
COPY docker/nginx.conf /etc/coolmargin/nginx.conf

USER proxy-runner
EXPOSE 8080
# healthy when the service answers /health through the proxy (bash's /dev/tcp: the image has no HTTP client)
HEALTHCHECK --interval=30s --timeout=5s --start-period=10s --retries=3 \
    CMD ["bash", "-c", "exec 3<>/dev/tcp/127.0.0.1/8080 && printf 'GET /health HTTP/1.0\\r\\nHost: localhost\\r\\n\\r\\n' >&3 && head -n 1 <&3 | grep -q ' 200 '"]
CMD ["bash", "-c", "mkdir -p /tmp/nginx && exec nginx -e stderr -c /etc/coolmargin/nginx.conf -g 'daemon off;'"]
