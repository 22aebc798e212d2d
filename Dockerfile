# driftlight image: one image for the coordinator (`driftlight watch`) and the workers
# (`driftlight worker`). Build: `docker compose build`. See docs/deployment.md.
FROM node:20-bookworm-slim AS build
WORKDIR /app
# Toolchain in case no prebuilt better-sqlite3 binary matches the platform.
RUN apt-get update \
  && apt-get install -y --no-install-recommends python3 make g++ \
  && rm -rf /var/lib/apt/lists/*
COPY . .
# npm ci runs the `prepare` script, which compiles TypeScript to dist/; then drop dev dependencies.
RUN npm ci && npm run build && npm prune --omit=dev

FROM node:20-bookworm-slim
ENV NODE_ENV=production
WORKDIR /app
COPY --from=build /app/package.json ./package.json
COPY --from=build /app/node_modules ./node_modules
COPY --from=build /app/dist ./dist
COPY --from=build /app/bin ./bin
COPY --from=build /app/schemas ./schemas
COPY --from=build /app/rules ./rules
# Mount points owned by the unprivileged user, so named volumes start out writable for it.
RUN mkdir -p /data/inbox /data/results /data/archive /data/quarantine /data/outbox /data/state /config \
  && chown -R node:node /data
USER node
# node itself is PID 1's child (compose sets init: true), so SIGTERM reaches driftlight's handlers.
ENTRYPOINT ["node", "/app/bin/driftlight.js"]
CMD ["--help"]
