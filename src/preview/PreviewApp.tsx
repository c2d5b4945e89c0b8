/**
 * The preview page: a sandbox workbook in a grid, with the REAL task pane beside it driving the
 * sandbox through `createWorkbookLayer(sandbox.run)`. Offline: nothing here makes a network call.
 */
import {
  Button,
  Field,
  Link,
  MessageBar,
  MessageBarBody,
  ProgressBar,
  Tab,
  TabList,
  Text,
  makeStyles,
  mergeClasses,
  tokens,
} from '@fluentui/react-components';
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { SandboxWorkbook } from '../sandbox/index.js';
import { downloadBlob } from '../taskpane/download.js';
import { browserPipeline } from '../taskpane/offThread.js';
import { TailmarkPane } from '../taskpane/Pane.js';
import type { ThemeName } from '../taskpane/theme.js';
import { createWorkbookLayer, type ExcelRunner } from '../workbook/layer.js';
import type { CsvChoices, CsvFound } from './csv.js';
import { FileChoices } from './FileChoices.js';
import { Grid } from './Grid.js';
import { a1, sandboxSource } from './sandboxSource.js';

const useStyles = makeStyles({
  page: {
    display: 'flex',
    flexDirection: 'column',
    height: '100vh',
    backgroundColor: tokens.colorNeutralBackground2,
    color: tokens.colorNeutralForeground1,
    boxSizing: 'border-box',
  },
  banner: {
    display: 'flex',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: tokens.spacingHorizontalM,
    padding: `${tokens.spacingVerticalS} ${tokens.spacingHorizontalM}`,
    backgroundColor: tokens.colorNeutralBackground4,
    borderBottom: `${tokens.strokeWidthThick} dashed ${tokens.colorPaletteMarigoldBorderActive}`,
  },
  badge: {
    fontWeight: tokens.fontWeightBold,
    fontSize: tokens.fontSizeBase400,
    color: tokens.colorNeutralForeground1,
    padding: `${tokens.spacingVerticalXXS} ${tokens.spacingHorizontalS}`,
    border: `${tokens.strokeWidthThick} solid ${tokens.colorPaletteMarigoldBorderActive}`,
    borderRadius: tokens.borderRadiusMedium,
  },
  body: { display: 'flex', flexGrow: 1, minHeight: 0, '@media (max-width: 720px)': { flexDirection: 'column', overflowY: 'auto' } },
  book: {
    display: 'flex',
    flexDirection: 'column',
    flexGrow: 1,
    minWidth: 0,
    minHeight: '320px',
    padding: tokens.spacingHorizontalS,
    gap: tokens.spacingVerticalXS,
    '@media (max-width: 720px)': { height: '60vh', flexShrink: 0 },
  },
  pane: {
    width: '360px',
    flexShrink: 0,
    overflowY: 'auto',
    borderLeft: `${tokens.strokeWidthThin} solid ${tokens.colorNeutralStroke1}`,
    backgroundColor: tokens.colorNeutralBackground1,
    '@media (max-width: 720px)': { width: '100%', borderLeft: 'none', overflowY: 'visible' },
  },
  tools: { display: 'flex', flexWrap: 'wrap', gap: tokens.spacingHorizontalS, alignItems: 'center' },
  muted: { color: tokens.colorNeutralForeground3, fontSize: tokens.fontSizeBase200 },
  hidden: { display: 'none' },
  flow: { height: 'auto', minHeight: '100vh' },
  paneOnly: { width: '100%', maxWidth: '480px', borderLeft: 'none', overflowY: 'visible' },
});

/**
 * Request size the preview plans for (bytes). The sandbox answers a sync on the page's own thread,
 * where Excel would do that work in its own process; smaller requests keep each sync's share of
 * the page's thread short (under about 100 ms at 300,000 rows) at the cost of more syncs.
 */
const PREVIEW_PAYLOAD_LIMIT = 1_000_000;

export interface PreviewProps {
  readonly initial: () => SandboxWorkbook;
  readonly theme: ThemeName;
  /** Extra wait before every sync, ms (?delay=): makes progress and Cancel visible on small data. */
  readonly syncDelay: number;
  /** 'pane' (?view=pane) shows only the task pane, in normal page flow (for narrow screens and screenshots). */
  readonly view: 'both' | 'pane';
}

/** Test and devtools hook (the page is offline and holds only what the user opened). */
export interface PreviewHook {
  snapshot(): string;
  highlightAt(sheet: string, row: number, col: number): { fill: string | null } | null;
  text(sheet: string, row: number, col: number): string;
  sheetNames(): string[];
  select(sheet: string, row: number, col: number): void;
  headers(sheet: string): string[];
}

declare global {
  interface Window {
    tailmarkPreview?: PreviewHook;
  }
}

/** Delimited text: read by the shared tabular reader (src/table). */
const isDelimited = (file: File) => /\.(csv|tsv|txt)$/i.test(file.name) || file.type === 'text/csv' || file.type === 'text/tab-separated-values';

function delayed(sb: SandboxWorkbook, ms: number, bump: () => void): ExcelRunner {
  return async (options, batch) => {
    try {
      return await sb.run(options, async (ctx) => {
        // Every sync waits for the next task (at least), as a real host's round trip does: the
        // page paints, takes input and answers Cancel between the syncs of a long run.
        const sync = ctx.sync.bind(ctx);
        ctx.sync = async <T,>(passThroughValue?: T) => {
          await new Promise((r) => setTimeout(r, ms));
          return sync(passThroughValue);
        };
        return batch(ctx);
      });
    } finally {
      bump();
    }
  };
}

export function PreviewApp({ initial, theme, syncDelay, view }: PreviewProps) {
  const s = useStyles();
  const [book, setBook] = useState<{ id: number; sb: SandboxWorkbook; name: string }>(() => ({ id: 1, sb: initial(), name: 'demo (invented claims)' }));
  const [version, setVersion] = useState(0);
  const [sheet, setSheet] = useState(() => book.sb.sheetNames()[0]);
  const [message, setMessage] = useState<{ intent: 'error' | 'info'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  /** Opening or downloading a file: what is happening and how far (null: not known). */
  const [work, setWork] = useState<{ what: string; fraction: number | null } | null>(null);
  /** The opened delimited file, what its reading found and the reviewer's choices (null: not a delimited file). */
  const [csv, setCsv] = useState<{ file: File; found: CsvFound; choices: CsvChoices } | null>(null);
  const fileRef = useRef<HTMLInputElement>(null);
  const bump = useCallback(() => setVersion((v) => v + 1), []);
  const source = useMemo(() => sandboxSource(book.sb), [book]);
  const pipeline = useMemo(() => browserPipeline(), []);
  const layer = useMemo(
    () => createWorkbookLayer(delayed(book.sb, syncDelay, bump), { runInContext: book.sb.run, pipeline, payloadLimit: PREVIEW_PAYLOAD_LIMIT }),
    [book, syncDelay, bump, pipeline],
  );

  // Follow the selection to its sheet when the pane moves it (e.g. Next exception).
  const selSheet = source.selection()?.sheet ?? null;
  const lastSel = useRef(selSheet);
  useEffect(() => {
    if (selSheet && selSheet !== lastSel.current) setSheet(selSheet);
    lastSel.current = selSheet;
  }, [selSheet, version]);

  const names = book.sb.sheetNames();
  const shown = names.includes(sheet) ? sheet : names[0];

  const select = useCallback(
    (row: number, col: number, extend: boolean) => {
      const cur = source.selection();
      const address = extend && cur && cur.sheet === shown ? a1(cur.row, cur.col, row, col) : a1(row, col);
      book.sb.userSelect(shown, address);
      bump();
    },
    [book, shown, source, bump],
  );

  const edit = useCallback(
    (row: number, col: number, value: string) => {
      book.sb.setCell(shown, row, col, value === '' ? null : value);
      bump();
    },
    [book, shown, bump],
  );

  useEffect(() => {
    const sb = book.sb;
    window.tailmarkPreview = {
      snapshot: () => JSON.stringify(sb.snapshot()),
      highlightAt: (sh, r, c) => sb.highlightAt(sh, r, c),
      text: (sh, r, c) => String(sb.valueAt(sh, r, c)),
      sheetNames: () => sb.sheetNames(),
      select: (sh, r, c) => {
        sb.userSelect(sh, a1(r, c));
        bump();
      },
      headers: (sh) => {
        const out: string[] = [];
        for (let c = 0; c < 200; c++) out.push(String(sb.valueAt(sh, 0, c)));
        return out;
      },
    };
  }, [book, bump]);

  const open = async (file: File, choices: CsvChoices = {}) => {
    setBusy(true);
    setMessage(null);
    try {
      let sb: SandboxWorkbook;
      setWork({ what: `Opening ${file.name}`, fraction: null });
      if (isDelimited(file)) {
        const { openCsv } = await import('./openCsv.js');
        const read = await openCsv(file, file.name.replace(/\.(csv|tsv|txt)$/i, '').slice(0, 31) || 'Sheet1', choices, (fraction) =>
          setWork({ what: `Opening ${file.name}`, fraction }),
        );
        sb = read.sb;
        setCsv({ file, found: read.found, choices });
      } else {
        setCsv(null);
        // Read in a worker (ExcelJS and the sandbox built there), handed over in parts.
        const { openXlsx } = await import('./openXlsx.js');
        sb = await openXlsx(file, (fraction) => setWork({ what: `Opening ${file.name}`, fraction }));
      }
      const first = sb.sheetNames()[0];
      sb.setSelection(first, 'A1');
      setBook((b) => ({ id: b.id + 1, sb, name: file.name }));
      setSheet(first);
      setMessage({ intent: 'info', text: `Opened ${file.name}. It stays in this browser tab; nothing is uploaded.` });
    } catch (e) {
      // The shared reader names the batch command's option; here the choice is the pane's control.
      const why = (e instanceof Error ? e.message : String(e)).replace(/^--header-row (\d+): /, 'Header row $1: ');
      setMessage({ intent: 'error', text: `Could not open ${file.name}: ${why}. Open an .xlsx, .csv or .tsv file.` });
    } finally {
      setBusy(false);
      setWork(null);
    }
  };

  const download = async () => {
    setBusy(true);
    setWork({ what: 'Building the .xlsx', fraction: null });
    try {
      const { sandboxToExcelJs } = await import('../sandbox/exceljs-bridge.js');
      // Let the progress line paint before the workbook is converted.
      await new Promise((r) => setTimeout(r, 50));
      const wb = sandboxToExcelJs(book.sb);
      const buf = await wb.xlsx.writeBuffer();
      const blob = new Blob([buf], { type: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet' });
      downloadBlob(blob, `${book.name.replace(/\.(xlsx|csv|tsv|txt)$/i, '').replace(/[^\w.-]+/g, '-')}-tailmark.xlsx`);
    } catch (e) {
      setMessage({ intent: 'error', text: `Could not build the .xlsx: ${e instanceof Error ? e.message : String(e)}.` });
    } finally {
      setBusy(false);
      setWork(null);
    }
  };

  const otherTheme = theme === 'dark' ? 'light' : 'dark';
  const query = (t: string, v: string) => `?theme=${t}${v === 'pane' ? '&view=pane' : ''}`;
  return (
    <div className={mergeClasses(s.page, view === 'pane' && s.flow)}>
      <header className={s.banner} role="banner">
        <span className={s.badge}>Preview — not Excel</span>
        <Text className={s.muted}>
          Tailmark’s real task pane on an in-browser workbook: {book.name}. Nothing leaves this page.
        </Text>
        <span style={{ flexGrow: 1 }} />
        <Link href={query(theme, view === 'pane' ? 'both' : 'pane')}>{view === 'pane' ? 'Show the workbook' : 'Pane only'}</Link>
        <Link href={query(otherTheme, view)}>{otherTheme === 'dark' ? 'Dark theme' : 'Light theme'}</Link>
      </header>
      <div className={s.body}>
        <section className={mergeClasses(s.book, view === 'pane' && s.hidden)} aria-label="Workbook">
          <div className={s.tools}>
            <Button size="small" onClick={() => fileRef.current?.click()} disabled={busy} data-testid="open-file">
              Open .xlsx, .csv or .tsv…
            </Button>
            <input
              ref={fileRef}
              className={s.hidden}
              type="file"
              accept=".xlsx,.csv,.tsv,.txt,text/csv,text/tab-separated-values,text/plain,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
              data-testid="file-input"
              onChange={(e) => {
                const f = e.target.files?.[0];
                e.target.value = '';
                if (f) void open(f);
              }}
            />
            <Button size="small" onClick={() => void download()} disabled={busy} data-testid="download">
              Download .xlsx
            </Button>
            <Text className={s.muted}>Click a cell to select it; Shift+click selects a block; arrow keys move.</Text>
          </div>
          {work && (
            <Field validationMessage={`${work.what}…`} validationState="none" data-testid="preview-progress">
              <ProgressBar value={work.fraction ?? undefined} max={1} />
            </Field>
          )}
          {message && (
            <MessageBar intent={message.intent} data-testid="preview-message">
              <MessageBarBody>{message.text}</MessageBarBody>
            </MessageBar>
          )}
          <TabList selectedValue={shown} onTabSelect={(_, d) => setSheet(String(d.value))} size="small" aria-label="Sheets">
            {names.map((n) => (
              <Tab key={n} value={n}>
                {n}
              </Tab>
            ))}
          </TabList>
          <Grid source={source} sheet={shown} version={version} onSelect={select} onEdit={edit} />
        </section>
        <aside className={mergeClasses(s.pane, view === 'pane' && s.paneOnly)} aria-label="Tailmark task pane">
          <TailmarkPane
            key={book.id}
            layer={layer}
            fileChoices={
              csv && <FileChoices name={csv.file.name} found={csv.found} choices={csv.choices} onChoose={(c) => void open(csv.file, c)} />
            }
          />
        </aside>
      </div>
    </div>
  );
}
