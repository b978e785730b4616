/// <reference types="vitest/config" />
import { fileURLToPath } from "node:url";
import tailwindcss from "@tailwindcss/vite";
import react from "@vitejs/plugin-react";
import { defineConfig } from "vite";

const alias = {
  "@": fileURLToPath(new URL("./src", import.meta.url)),
  "@shared": fileURLToPath(new URL("./shared", import.meta.url)),
};

// The API server listens on SIGMAFLOW_PORT (deploy/start.sh); `npm run dev` proxies to it.
const apiTarget = `http://127.0.0.1:${process.env.SIGMAFLOW_PORT ?? "5180"}`;

export default defineConfig({
  plugins: [react(), tailwindcss()],
  resolve: { alias },
  server: {
    host: "127.0.0.1",
    proxy: {
      // The live run feed (socket.io at /api/live): WebSockets too, with the Origin the API server expects
      // (it refuses browser connections from any other Origin than its public URL).
      "/api/live": {
        target: apiTarget,
        ws: true,
        configure: (proxy) => {
          proxy.on("proxyReqWs", (proxyReq) => proxyReq.setHeader("origin", apiTarget));
        },
      },
      "/api": apiTarget,
    },
  },
  build: { outDir: "dist/client", sourcemap: true },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: "unit",
          environment: "node",
          include: ["tests/unit/**/*.test.ts"],
        },
      },
      {
        extends: true,
        test: {
          name: "client",
          environment: "jsdom",
          include: ["tests/client/**/*.test.{ts,tsx}"],
          setupFiles: ["tests/client/setup.ts"],
        },
      },
      {
        extends: true,
        test: {
          name: "integration",
          environment: "node",
          include: ["tests/integration/**/*.test.ts"],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          environment: "node",
          include: ["tests/e2e/**/*.test.ts"],
          testTimeout: 90_000,
          hookTimeout: 90_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
