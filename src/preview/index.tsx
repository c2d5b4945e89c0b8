/** Preview page entry: the demo workbook in the sandbox, with the real task pane beside it. */
import { FluentProvider } from '@fluentui/react-components';
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { fluentTheme, pickTheme } from '../taskpane/theme.js';
import { PreviewApp } from './PreviewApp.js';
import { demoSandbox } from './sandboxSource.js';

const params = new URLSearchParams(window.location.search);
const theme = pickTheme(window.location.search, null);
const delay = Math.min(5000, Math.max(0, Number(params.get('delay') ?? 0) || 0));
const el = document.getElementById('root');
if (el) {
  createRoot(el).render(
    <StrictMode>
      <FluentProvider theme={fluentTheme(theme)} style={{ minHeight: '100%' }}>
        <PreviewApp initial={demoSandbox} theme={theme} syncDelay={delay} view={params.get('view') === 'pane' ? 'pane' : 'both'} />
      </FluentProvider>
    </StrictMode>,
  );
}
