/**
 * Task pane entry. In Excel: waits for Office.onReady and drives the real workbook through
 * `createWorkbookLayer(Excel.run)`. Opened in a plain browser: says how to open it in Excel and
 * links to the offline preview page.
 */
import { FluentProvider, Link, Text, makeStyles, tokens } from '@fluentui/react-components';
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { createWorkbookLayer } from '../workbook/layer.js';
import { browserPipeline } from './offThread.js';
import { TailmarkPane } from './Pane.js';
import { fluentTheme, pickTheme } from './theme.js';

const useStyles = makeStyles({
  box: {
    display: 'flex',
    flexDirection: 'column',
    gap: tokens.spacingVerticalM,
    padding: tokens.spacingHorizontalL,
    minHeight: '100vh',
    boxSizing: 'border-box',
    backgroundColor: tokens.colorNeutralBackground1,
    color: tokens.colorNeutralForeground1,
  },
});

function OutsideOffice() {
  const s = useStyles();
  return (
    <main className={s.box} data-testid="outside-office">
      <Text as="h1" size={500} weight="semibold">
        Tailmark runs inside Excel
      </Text>
      <Text>
        This page is the Tailmark task pane. To use it, add it to Excel: in Excel choose Home › Add-ins › More add-ins › My add-ins ›
        Upload my add-in, pick <code>manifest.xml</code> from the Tailmark folder, then press the Tailmark button on the Home tab.
        Your workbook must be open in Excel (desktop or on the web).
      </Text>
      <Text>
        To try it without Excel, open the <Link href="preview.html">preview page</Link>: an offline copy of the pane working on a
        made-up workbook in your browser.
      </Text>
    </main>
  );
}

function render(node: React.ReactNode, officeBackground: string | null): void {
  const el = document.getElementById('root');
  if (!el) return;
  const theme = fluentTheme(pickTheme(window.location.search, officeBackground));
  createRoot(el).render(
    <StrictMode>
      <FluentProvider theme={theme} style={{ minHeight: '100vh' }}>
        {node}
      </FluentProvider>
    </StrictMode>,
  );
}

function start(): void {
  if (typeof Office === 'undefined') {
    render(<OutsideOffice />, null);
    return;
  }
  void Office.onReady((info) => {
    const background = Office.context?.officeTheme?.bodyBackgroundColor ?? null;
    if (info.host === Office.HostType.Excel) {
      const layer = createWorkbookLayer(Excel.run, { runInContext: Excel.run, pipeline: browserPipeline() });
      render(<TailmarkPane layer={layer} />, background);
    } else {
      render(<OutsideOffice />, background);
    }
  });
}

start();
