import { defineConfig } from "vite";

// The web app: sources in web/, the kernels from build/ (fetched as assets, never inlined).
export default defineConfig({
  root: "web",
  base: "./",
  publicDir: false,
  build: { outDir: "../dist", emptyOutDir: true, target: "es2022", assetsInlineLimit: 0, chunkSizeWarningLimit: 2000 },
  worker: { format: "es" },
  // pre-bundle what the workers import too, so the dev server never reloads the page mid-run
  optimizeDeps: { include: ["apache-arrow", "comlink", "echarts/core", "echarts/charts", "echarts/components", "echarts/renderers"] },
  server: { host: "127.0.0.1", port: 5173, strictPort: false },
  preview: { host: "127.0.0.1", port: 4173 },
});
