# syntax=docker/dockerfile:1
# Multi-stage build: compile with the dev dependencies, run with production ones only, as a non-root user, under
# tini so that signals reach node and zombies are reaped.

# Node 24 is a maintained LTS line (Node 20 reached end of life on 2026-04-30). The package itself still runs on
# Node >= 20.19 (package.json "engines"), which is what the development machines have.
FROM node:24-bookworm-slim AS build
WORKDIR /app
COPY package.json package-lock.json ./
# The sources are not here yet, so the "prepare" build is skipped and run explicitly below.
RUN npm ci --no-audit --no-fund --ignore-scripts
COPY tsconfig.json tsconfig.build.json ./
COPY scripts/build.mjs ./scripts/build.mjs
COPY src ./src
COPY services ./services
COPY cli ./cli
RUN npm run build

FROM node:24-bookworm-slim AS runtime
RUN apt-get update && apt-get install -y --no-install-recommends tini && rm -rf /var/lib/apt/lists/*
WORKDIR /app
ENV NODE_ENV=production HOST=0.0.0.0 PORT=8080
COPY package.json package-lock.json ./
RUN npm ci --omit=dev --no-audit --no-fund --ignore-scripts && npm cache clean --force
COPY --from=build /app/dist ./dist
USER node
EXPOSE 8080
HEALTHCHECK --interval=10s --timeout=2s --retries=3 \
  CMD node -e "fetch('http://127.0.0.1:'+(process.env.PORT||8080)+'/healthz').then(r=>process.exit(r.ok?0:1)).catch(()=>process.exit(1))"
ENTRYPOINT ["/usr/bin/tini", "--"]
CMD ["node", "--max-semi-space-size=64", "dist/services/server.js"]
