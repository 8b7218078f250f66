/// <reference types="vitest/config" />
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { defineConfig, normalizePath, type Plugin } from 'vite';
import react from '@vitejs/plugin-react';
import { VitePWA } from 'vite-plugin-pwa';
import { appManifest, buildId, workboxOptions } from './src/ui/pwa/pwa-config.ts';

const IONIC_REACT = normalizePath(createRequire(import.meta.url).resolve('@ionic/react'));
const PROXY_QUERY = '?arcfield-proxy=';

/**
 * The generated React proxies of @ionic/react (`const IonX = createComponent({...})`), each as
 * a module of its own, keyed by export name. Only those whose element class and define function
 * come from an @ionic/core component module, and which @ionic/react does not use itself, are
 * taken; anything else stays with @ionic/react.
 */
function ionicReactProxyModules(source: string): Map<string, string> {
  const importOf = new Map<string, string>();
  for (const m of source.matchAll(/^import \{([^}]*)\} from '(@ionic\/core\/components\/ion-[\w-]+\.js)';$/gm)) {
    for (const spec of m[1].split(',')) {
      const [imported, local = imported] = spec.trim().split(/\s+as\s+/);
      importOf.set(local, `import { ${imported} as ${local} } from '${m[2]}';`);
    }
  }
  const modules = new Map<string, string>();
  for (const m of source.matchAll(/^const (Ion\w+) = \/\*@__PURE__\*\/ createComponent\(\{\n[\s\S]*?\n\}\);$/gm)) {
    const elementClass = /^\s*elementClass: ([\w$]+),$/m.exec(m[0])?.[1];
    const define = /^\s*defineCustomElement: ([\w$]+)$/m.exec(m[0])?.[1];
    const classImport = elementClass && importOf.get(elementClass);
    const defineImport = define && importOf.get(define);
    // Named three times (the core import, the declaration, the export list) unless @ionic/react
    // itself uses the proxy (IonTab, compared by identity in IonTabs): then it stays there.
    const mentions = source.match(new RegExp(`\\b${m[1]}\\b(?!\\$)`, 'g'))?.length ?? 0;
    if (!classImport || !defineImport || mentions > 3) continue;
    modules.set(m[1], [
      "import React from 'react';",
      "import { createComponent } from '@stencil/react-output-target/runtime';",
      classImport, defineImport, `export ${m[0]}`,
    ].join('\n'));
  }
  return modules;
}

/**
 * @ionic/react ships every component wrapper in one module, and a module cannot be split across
 * chunks: each Ionic component that any lazily loaded screen uses (select and its overlays,
 * textarea, toggle, segment, progress bar) would be in the first chunk. This build-only plugin
 * (1) serves each generated proxy as its own module (its text copied from @ionic/react, so the
 * events and element are the same) and points our screens' named imports at them, so a component
 * lands in the chunk of the screens that use it; (2) marks the wrapper factories that @ionic/react
 * calls at top level without a pure annotation as pure in that one module, so that unused
 * wrappers (ion-nav) and the element definitions they pull in are dropped.
 * Shared state (contexts, router, hooks) stays in the single @ionic/react module.
 */
function ionicReactPerComponent(): Plugin {
  let proxies: Map<string, string> | undefined;
  const proxyModules = () => (proxies ??= ionicReactProxyModules(readFileSync(IONIC_REACT, 'utf8')));
  return {
    name: 'arcfield-ionic-react-per-component',
    apply: 'build',
    enforce: 'pre',
    resolveId: (id) => (id.startsWith(IONIC_REACT + PROXY_QUERY) ? id : null),
    load(id) {
      if (!id.startsWith(IONIC_REACT + PROXY_QUERY)) return null;
      const name = id.slice(IONIC_REACT.length + PROXY_QUERY.length);
      const code = proxyModules().get(name);
      if (code === undefined) throw new Error(`arcfield-ionic-react-per-component: no generated proxy for ${name}`);
      return code;
    },
    transform(code, id) {
      if (id === IONIC_REACT) return code.replace(/^(const [\w$]+ = )(createReactComponent|createForwardRef|React\.memo)\(/gm, '$1/*@__PURE__*/ $2(');
      if (!/[\\/]src[\\/]ui[\\/][^?]*\.tsx?$/.test(id) || !code.includes("from '@ionic/react'")) return null;
      return code.replace(/^import \{([^}]*)\} from '@ionic\/react';$/gm, (all: string, specs: string) => {
        const shared: string[] = [];
        const own: string[] = [];
        for (const spec of specs.split(',').map((s) => s.trim()).filter(Boolean)) {
          const name = spec.split(/\s+as\s+/)[0];
          if (proxyModules().has(name)) own.push(`import { ${spec} } from '${IONIC_REACT}${PROXY_QUERY}${name}';`);
          else shared.push(spec);
        }
        // Same number of lines as the import it replaces, so later line numbers do not move.
        const lineBreaks = '\n'.repeat(all.split('\n').length - 1);
        return [shared.length ? `import { ${shared.join(', ')} } from '@ionic/react';` : '', ...own].join(' ') + lineBreaks;
      });
    },
  };
}

// Web app build and unit-test configuration. PWA decisions: see DEVELOPERS.md "The field app".
export default defineConfig({
  plugins: [
    ionicReactPerComponent(),
    react(),
    // registerType 'prompt': a new version waits for the person's "Reload" (never a silent reload
    // that loses a form — field-traps ); src/ui/pwa/register-app-worker.ts registers it.
    VitePWA({ registerType: 'prompt', injectRegister: false, manifest: appManifest, workbox: workboxOptions }),
  ],
  define: { __ARCFIELD_BUILD_ID__: JSON.stringify(buildId()) },
  build: {
    // dist/.vite/manifest.json: the chunk import graph that bench/app-size.ts reads to size the
    // initial transfer (entry + static imports + CSS) apart from the lazily loaded chunks.
    manifest: true,
    // @ionic/core's per-component modules are side-effect free in practice but not marked so;
    // declaring them so lets the bundler drop unused components (the team notes (shared/toolchain.md) §1).
    rolldownOptions: { treeshake: { moduleSideEffects: (id: string) => !/[\\/]@ionic[\\/]core[\\/]components[\\/]ion-[^\\/]+\.js$/.test(id) } },
  },
  test: {
    environment: 'node',
    include: ['test/**/*.test.ts', 'test/**/*.test.tsx'],
    setupFiles: ['test/setup.ts'],
    testTimeout: 30_000,
    hookTimeout: 60_000,
  },
});
