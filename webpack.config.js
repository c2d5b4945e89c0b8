// Browser bundles of Tailmark: the task pane (taskpane.html) and the offline preview page (preview.html).
// `npm run build` -> dist-web/. The pane loads Office.js from Microsoft's CDN (Office requires that);
// the preview page makes no network calls at all.
import path from 'node:path';
import { builtinModules } from 'node:module';
import { fileURLToPath } from 'node:url';
import HtmlWebpackPlugin from 'html-webpack-plugin';
import CopyWebpackPlugin from 'copy-webpack-plugin';
import webpack from 'webpack';

const root = path.dirname(fileURLToPath(import.meta.url));
const nodeBuiltins = builtinModules.filter((m) => !m.startsWith('_'));

/** Node built-ins resolve to nothing in the browser; the guard below fails the build if any is imported. */
const fallback = Object.fromEntries(nodeBuiltins.flatMap((m) => [[m, false], [`node:${m}`, false]]));

/**
 * Fails the build when a browser bundle pulls in a Node built-in, src/files or src/cli
 * (ARCHITECTURE.md: a browser bundle never pulls in files or cli).
 */
export class BrowserBoundaryPlugin {
  apply(compiler) {
    const forbiddenDirs = [path.join(root, 'src', 'files') + path.sep, path.join(root, 'src', 'cli') + path.sep];
    const builtinSet = new Set(nodeBuiltins);
    compiler.hooks.thisCompilation.tap('BrowserBoundaryPlugin', (compilation) => {
      compilation.hooks.finishModules.tap('BrowserBoundaryPlugin', (modules) => {
        for (const mod of modules) {
          const resource = mod.resource ?? '';
          if (forbiddenDirs.some((d) => resource.startsWith(d))) {
            compilation.errors.push(new Error(`Browser bundle imports ${path.relative(root, resource)} (src/files and src/cli are Node-only).`));
          }
          for (const dep of mod.dependencies ?? []) {
            const request = dep.request;
            if (typeof request !== 'string') continue;
            const bare = request.startsWith('node:') ? request.slice(5) : request;
            const base = bare.split('/')[0];
            if (request.startsWith('node:') || (builtinSet.has(base) && !request.startsWith('.'))) {
              // A package's own dependency of the same name (e.g. "events", "buffer" from npm) is fine
              // only when it resolves into node_modules; a fallback-to-false resolution is an error.
              const resolved = compilation.moduleGraph.getModule(dep);
              const resolvedPath = resolved && resolved.resource;
              if (!resolvedPath) {
                compilation.errors.push(new Error(`Browser bundle imports the Node built-in "${request}" from ${path.relative(root, resource) || 'a module'}.`));
              }
            }
          }
        }
      });
    });
  }
}

export default (env = {}, argv = {}) => {
  const production = argv.mode !== 'development';
  const allEntries = {
    taskpane: './src/taskpane/index.tsx',
    preview: './src/preview/index.tsx',
    commands: './src/taskpane/commands.ts',
  };
  // `--env only=preview` builds one page (quicker while working on it).
  const only = typeof env.only === 'string' ? env.only.split(',') : null;
  const entry = only ? Object.fromEntries(Object.entries(allEntries).filter(([k]) => only.includes(k))) : allEntries;
  const page = (name, options) => (entry[name] || name === 'help' ? [new HtmlWebpackPlugin({ filename: `${name}.html`, ...options })] : []);
  return {
    mode: production ? 'production' : 'development',
    target: ['web', 'es2022'],
    devtool: production ? false : 'source-map',
    context: root,
    entry,
    output: {
      path: path.join(root, 'dist-web'),
      filename: '[name].[contenthash:8].js',
      chunkFilename: '[name].[contenthash:8].js',
      clean: true,
    },
    resolve: {
      extensions: ['.ts', '.tsx', '.js'],
      extensionAlias: { '.js': ['.ts', '.tsx', '.js'] },
      fallback,
    },
    module: {
      // ExcelJS's browser build is already bundled (UMD); parsing it again only slows the build.
      noParse: /exceljs[\\/]dist[\\/]exceljs(\.bare)?(\.min)?\.js$/,
      rules: [
        {
          test: /\.tsx?$/,
          exclude: /node_modules/,
          use: {
            loader: 'ts-loader',
            options: {
              transpileOnly: true,
              compilerOptions: { module: 'ES2022', moduleResolution: 'Bundler', noEmit: false, sourceMap: !production },
            },
          },
        },
      ],
    },
    optimization: {
      splitChunks: false,
    },
    performance: { hints: false },
    plugins: [
      // "node:fs" -> "fs", so the fallbacks above apply and BrowserBoundaryPlugin names the import.
      new webpack.NormalModuleReplacementPlugin(/^node:/, (resource) => {
        resource.request = resource.request.replace(/^node:/, '');
      }),
      new BrowserBoundaryPlugin(),
      ...page('taskpane', { template: './src/taskpane/taskpane.html', chunks: ['taskpane'], scriptLoading: 'defer' }),
      ...page('preview', { template: './src/preview/preview.html', chunks: ['preview'], scriptLoading: 'defer' }),
      ...page('commands', { template: './src/taskpane/commands.html', chunks: ['commands'], scriptLoading: 'defer' }),
      ...page('help', { template: './src/taskpane/help.html', chunks: [], inject: false }),
      new CopyWebpackPlugin({ patterns: [{ from: 'assets', to: 'assets', noErrorOnMissing: true }] }),
    ],
  };
};
