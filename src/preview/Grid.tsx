/**
 * The preview page's spreadsheet grid. Virtualised: only the rows in view (plus a margin) are in
 * the DOM, so a sheet with a million rows scrolls without freezing. Colours of highlighted cells
 * come from the sandbox's conditional-format evaluation (highlightAt); everything else uses tokens.
 */
import { makeStyles, mergeClasses, tokens } from '@fluentui/react-components';
import { useCallback, useEffect, useRef, useState, type KeyboardEvent } from 'react';
import type { GridSource } from './source.js';

export const ROW_HEIGHT = 24;
const HEADER_HEIGHT = 24;
const ROW_HEADER_WIDTH = 56;
const OVERSCAN = 10;
const MIN_COL_WIDTH = 64;
/** Widest column drawn (px): Tailmark's widest result column (60 characters) fits. */
const MAX_COL_WIDTH = 480;

const useStyles = makeStyles({
  scroller: {
    position: 'relative',
    overflow: 'auto',
    flexGrow: 1,
    minHeight: '200px',
    backgroundColor: tokens.colorNeutralBackground1,
    border: `${tokens.strokeWidthThin} solid ${tokens.colorNeutralStroke2}`,
    outlineStyle: 'none',
    ':focus-visible': { outline: `${tokens.strokeWidthThick} solid ${tokens.colorStrokeFocus2}` },
  },
  row: { position: 'absolute', left: 0, display: 'flex' },
  cell: {
    boxSizing: 'border-box',
    height: `${ROW_HEIGHT}px`,
    lineHeight: `${ROW_HEIGHT - 2}px`,
    padding: `0 ${tokens.spacingHorizontalXS}`,
    borderRight: `${tokens.strokeWidthThin} solid ${tokens.colorNeutralStroke3}`,
    borderBottom: `${tokens.strokeWidthThin} solid ${tokens.colorNeutralStroke3}`,
    whiteSpace: 'nowrap',
    overflow: 'hidden',
    textOverflow: 'ellipsis',
    fontSize: tokens.fontSizeBase200,
    cursor: 'cell',
    flexShrink: 0,
  },
  num: { textAlign: 'right', fontVariantNumeric: 'tabular-nums' },
  head: {
    backgroundColor: tokens.colorNeutralBackground3,
    color: tokens.colorNeutralForeground2,
    textAlign: 'center',
    fontWeight: tokens.fontWeightSemibold,
    cursor: 'default',
  },
  selected: { outline: `${tokens.strokeWidthThick} solid ${tokens.colorBrandStroke1}`, outlineOffset: '-2px' },
  // A selected block is framed top and bottom (not filled), so highlight colours stay readable.
  inArea: { boxShadow: `inset 0 2px 0 ${tokens.colorBrandStroke1}, inset 0 -2px 0 ${tokens.colorBrandStroke1}` },
  select: {
    width: '100%',
    height: `${ROW_HEIGHT - 4}px`,
    fontSize: tokens.fontSizeBase200,
    border: 'none',
    backgroundColor: 'transparent',
    color: 'inherit',
  },
  stickyTop: { position: 'sticky', top: 0, zIndex: 2 },
  stickyLeft: { position: 'sticky', left: 0, zIndex: 1 },
});

export interface GridProps {
  readonly source: GridSource;
  readonly sheet: string;
  /** Bumped whenever the workbook changed, to re-read cells. */
  readonly version: number;
  readonly onSelect: (row: number, col: number, extend: boolean) => void;
  readonly onEdit: (row: number, col: number, value: string) => void;
}

export function Grid({ source, sheet, version, onSelect, onEdit }: GridProps) {
  const s = useStyles();
  const ref = useRef<HTMLDivElement>(null);
  const [scrollTop, setScrollTop] = useState(0);
  const [height, setHeight] = useState(600);
  const size = source.size(sheet);
  const rows = Math.max(size.rows + 5, 30);
  const cols = Math.max(size.cols + 1, 8);
  const widths = source.columnWidths(sheet, cols).map((w) => Math.min(MAX_COL_WIDTH, Math.max(MIN_COL_WIDTH, w)));
  const totalWidth = ROW_HEADER_WIDTH + widths.reduce((a, b) => a + b, 0);
  const sel = source.selection();
  const active = sel && sel.sheet === sheet ? sel : null;

  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const ro = new ResizeObserver(() => setHeight(el.clientHeight));
    ro.observe(el);
    setHeight(el.clientHeight);
    return () => ro.disconnect();
  }, []);

  // Keep the active cell in view when something else (the pane's Next / Previous) moves it.
  const activeRow = active?.row ?? -1;
  useEffect(() => {
    const el = ref.current;
    if (!el || activeRow < 0) return;
    const top = HEADER_HEIGHT + activeRow * ROW_HEIGHT;
    if (top < el.scrollTop + HEADER_HEIGHT || top + ROW_HEIGHT > el.scrollTop + el.clientHeight) {
      el.scrollTop = Math.max(0, top - el.clientHeight / 2);
      setScrollTop(el.scrollTop);
    }
  }, [activeRow, sheet]);

  const first = Math.max(0, Math.floor(scrollTop / ROW_HEIGHT) - OVERSCAN);
  const last = Math.min(rows, Math.ceil((scrollTop + height) / ROW_HEIGHT) + OVERSCAN);

  const onKey = useCallback(
    (e: KeyboardEvent<HTMLDivElement>) => {
      if (!active) return;
      const moves: Record<string, [number, number]> = { ArrowUp: [-1, 0], ArrowDown: [1, 0], ArrowLeft: [0, -1], ArrowRight: [0, 1] };
      const m = moves[e.key];
      if (!m) return;
      e.preventDefault();
      const r = Math.max(0, Math.min(rows - 1, active.row + m[0]));
      const c = Math.max(0, Math.min(cols - 1, active.col + m[1]));
      onSelect(r, c, false);
      const el = ref.current;
      if (el) {
        const top = HEADER_HEIGHT + r * ROW_HEIGHT;
        if (top < el.scrollTop + HEADER_HEIGHT) el.scrollTop = top - HEADER_HEIGHT;
        else if (top + ROW_HEIGHT > el.scrollTop + el.clientHeight) el.scrollTop = top + ROW_HEIGHT - el.clientHeight;
      }
    },
    [active, rows, cols, onSelect],
  );

  const rowEls = [];
  for (let r = first; r < last; r++) {
    const cells = [];
    for (let c = 0; c < cols; c++) {
      const text = source.text(sheet, r, c);
      const hl = source.highlight(sheet, r, c);
      const list = source.validation(sheet, r, c);
      const isActive = !!active && active.row === r && active.col === c;
      const inArea = !!active && r >= active.r0 && r <= active.r1 && c >= active.c0 && c <= active.c1 && !isActive;
      const style = {
        width: widths[c],
        ...(hl?.fill ? { backgroundColor: hl.fill } : {}),
        ...(hl?.font ? { color: hl.font } : {}),
        ...(hl?.bold ? { fontWeight: tokens.fontWeightSemibold } : {}),
      };
      cells.push(
        <div
          key={c}
          role="gridcell"
          aria-selected={isActive}
          data-cell={`${r},${c}`}
          data-fill={hl?.fill ?? ''}
          className={mergeClasses(s.cell, source.isNumber(sheet, r, c) && s.num, isActive && s.selected, inArea && s.inArea)}
          style={style}
          title={text}
          onMouseDown={(e) => {
            if ((e.target as HTMLElement).tagName === 'SELECT') return;
            onSelect(r, c, e.shiftKey);
          }}
        >
          {list ? (
            <select
              className={s.select}
              value={list.includes(text) ? text : ''}
              aria-label={`Status, row ${r + 1}`}
              data-status-row={r}
              onFocus={() => onSelect(r, c, false)}
              onChange={(e) => onEdit(r, c, e.target.value)}
            >
              <option value="">{text && !list.includes(text) ? text : ''}</option>
              {list.map((v) => (
                <option key={v} value={v}>
                  {v}
                </option>
              ))}
            </select>
          ) : (
            text
          )}
        </div>,
      );
    }
    rowEls.push(
      <div key={r} role="row" className={s.row} style={{ top: HEADER_HEIGHT + r * ROW_HEIGHT, width: totalWidth }}>
        <div role="rowheader" className={mergeClasses(s.cell, s.head, s.stickyLeft)} style={{ width: ROW_HEADER_WIDTH }}>
          {r + 1}
        </div>
        {cells}
      </div>,
    );
  }

  return (
    <div
      ref={ref}
      className={s.scroller}
      role="grid"
      aria-label={`Sheet ${sheet}`}
      aria-rowcount={rows}
      aria-colcount={cols}
      tabIndex={0}
      onScroll={(e) => setScrollTop(e.currentTarget.scrollTop)}
      onKeyDown={onKey}
      data-testid="grid"
      data-version={version}
    >
      <div style={{ height: HEADER_HEIGHT + rows * ROW_HEIGHT, width: totalWidth, position: 'relative' }}>
        <div role="row" className={mergeClasses(s.row, s.stickyTop)} style={{ top: 0, width: totalWidth }}>
          <div className={mergeClasses(s.cell, s.head, s.stickyLeft)} style={{ width: ROW_HEADER_WIDTH }} />
          {widths.map((w, c) => (
            <div key={c} role="columnheader" className={mergeClasses(s.cell, s.head)} style={{ width: w }}>
              {source.columnName(c)}
            </div>
          ))}
        </div>
        {rowEls}
      </div>
    </div>
  );
}
