// Bundles the analysis worker (server/analysis/worker.ts) into one ES module file. Nitro splits
// server code into chunks, none of which can start a worker thread, so the worker is built on
// its own: by the `compiled` hook in nuxt.config.ts into the server output, and on start in
// development. Everything is bundled (the output runs without node_modules).
import { resolve, join } from 'node:path'

/** File name of the bundle next to the server entry (.output/server/index.mjs). */
export const WORKER_BUNDLE = 'analysis-worker.mjs'

/** Builds the worker bundle from `rootDir` into `outFile`. */
export async function buildAnalysisWorker (rootDir: string, outFile: string): Promise<void> {
  const esbuild = await import('esbuild')
  await esbuild.build({
    entryPoints: [join(rootDir, 'server/analysis/worker.ts')],
    outfile: resolve(outFile),
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    // An optional decoder of the @audio family that is not installed (APE files are not taken).
    external: ['@audio/decode-ape'],
    // CommonJS dependencies call require(); give the ES module bundle one. (Spelled in pieces:
    // the development server rewrites every literal "import" + ".meta" in the code it loads.)
    banner: { js: `import { createRequire as __cr } from 'module'; const require = __cr(${['import', 'meta', 'url'].join('.')});` },
    logLevel: 'warning',
    legalComments: 'none',
    plugins: [{
      name: 'nuxt-aliases',
      setup (build) {
        build.onResolve({ filter: /^#shared\// }, args => build.resolve(`./shared/${args.path.slice('#shared/'.length)}`, { resolveDir: rootDir, kind: args.kind }))
      },
    }],
    resolveExtensions: ['.ts', '.mjs', '.js', '.json'],
  })
}
