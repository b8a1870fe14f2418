import { cp, writeFile } from 'node:fs/promises'
import { resolve } from 'node:path'
import { templateCompilerOptions } from '@tresjs/core'
import pkg from './package.json' with { type: 'json' }

// The project root is the source directory (no app/ folder): pages/, components/, stores/ at the top.
/** Worker-thread entries are bundled separately: Nitro's bundle has no file a Worker could start. */
async function buildWorkers(outdir: string) {
  const { build } = await import('esbuild')
  await build({
    entryPoints: { 'task-thread': resolve('server/workers/task-thread.ts'), 'task-process': resolve('server/workers/task-process.ts') },
    outdir,
    outExtension: { '.js': '.mjs' },
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    external: ['manifold-3d', 'bullmq', 'ioredis', '@aws-sdk/client-s3'],
    banner: { js: 'import { createRequire as __isthmusRequire } from \'node:module\'; const require = __isthmusRequire(import.meta.url);' },
    logLevel: 'warning',
  })
}

export default defineNuxtConfig({
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', 'nuxt-auth-utils'],
  devtools: { enabled: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Isthmus',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'Shapes, gravity and joining kinematics of bilobed small bodies.' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  css: ['~/assets/css/main.css'],
  vue: { compilerOptions: templateCompilerOptions.template.compilerOptions },
  runtimeConfig: {
    version: pkg.version,
    // Everything below is read from the environment at start by server/utils/config.ts,
    // so the built server honours DATABASE_URL, UPLOADS_DIR, SMTP_URL, ... as documented.
    session: { maxAge: 60 * 60 * 24 * 7 },
  },
  build: { transpile: [/@tresjs/] },
  compatibilityDate: '2026-11-01',
  nitro: {
    serverAssets: [{ baseName: 'openapi', dir: 'openapi' }],
    typescript: { tsConfig: { compilerOptions: { noUncheckedIndexedAccess: false } } },
    // manifold-3d loads its .wasm next to its own file: keep it a real package in .output.
    externals: { external: ['manifold-3d'], traceInclude: ['manifold.js', 'manifold.wasm'].map(f => resolve('node_modules/manifold-3d', f)) },
    experimental: { tasks: false },
    hooks: {
      // Migrations live beside the built server entry so the built app finds them (see STACK.md).
      async compiled(nitro) {
        await cp(resolve(nitro.options.rootDir, 'server/db/migrations'), resolve(nitro.options.output.serverDir, 'migrations'), { recursive: true })
        // The built server's route table (scanned and module-added handlers), for the role-matrix test.
        const routes = [...nitro.scannedHandlers, ...nitro.options.handlers]
          .filter(h => h.route && !h.middleware)
          .map(h => ({ route: h.route, method: (h.method ?? 'all').toUpperCase() }))
        await writeFile(resolve(nitro.options.output.serverDir, 'routes.json'), JSON.stringify(routes, null, 2))
        await buildWorkers(resolve(nitro.options.output.serverDir, 'workers'))
      },
    },
  },
  vite: {
    optimizeDeps: { include: ['@tresjs/cientos', 'three', 'three-mesh-bvh'] },
    plugins: [
      {
        name: 'isthmus-hmr-loopback',
        enforce: 'post',
        config(config) {
          if (config.server?.hmr && typeof config.server.hmr === 'object') config.server.hmr.host = '127.0.0.1'
        },
      },
    ],
  },
  // Strict, but without noUncheckedIndexedAccess: the numerical core indexes typed arrays in hot
  // loops, where `number | undefined` on every read would only add noise.
  typescript: {
    strict: true,
    typeCheck: false,
    tsConfig: { compilerOptions: { noUncheckedIndexedAccess: false } },
    sharedTsConfig: { compilerOptions: { noUncheckedIndexedAccess: false } },
    nodeTsConfig: { compilerOptions: { noUncheckedIndexedAccess: false } },
  },
  telemetry: false,
  hooks: {
    // `nuxt dev` starts workers from .nuxt/workers.
    async ready(nuxt) {
      if (nuxt.options.dev) await buildWorkers(resolve(nuxt.options.buildDir, 'workers'))
    },
  },
  // The app keeps its own session store (GET /api/session); nuxt-auth-utils' own page plugins would
  // fetch /api/_auth/session once more on every server render, for nothing.
  auth: { loadStrategy: 'none' },
  tailwindcss: { configPath: 'tailwind.config.ts', cssPath: false },
})
