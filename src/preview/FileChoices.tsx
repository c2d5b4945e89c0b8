/**
 * The preview page's reading choices for an opened .csv/.tsv/.txt: text encoding and header row,
 * each showing what the reader found, shown in the pane next to the decimal separator control.
 * Changing one reads the file again with that choice. (In Excel the add-in reads cells, not
 * files: the header row is found from the selection and there is no encoding to choose.)
 */
import { Field, Select } from '@fluentui/react-components';
import { ENCODINGS, ENCODING_WORDS, type TextEncodingName } from '../table/encoding.js';
import type { CsvChoices, CsvFound } from './csv.js';

/** Header rows offered (a title block taller than this is rare; the batch command takes any number). */
const HEADER_ROWS = 20;

export function FileChoices({ name, found, choices, onChoose }: { name: string; found: CsvFound; choices: CsvChoices; onChoose: (c: CsvChoices) => void }) {
  const how = choices.encoding ? 'as chosen' : found.encodingHow;
  return (
    <>
      <Field label={`Text encoding of ${name}`} hint={`Read as ${ENCODING_WORDS[found.encoding]} (${how}).`}>
        <Select
          value={choices.encoding ?? 'auto'}
          onChange={(_, d) => onChoose({ ...choices, encoding: d.value === 'auto' ? undefined : (d.value as TextEncodingName) })}
          data-testid="file-encoding"
        >
          <option value="auto">Decide from the file's bytes</option>
          {ENCODINGS.map((e) => (
            <option key={e} value={e}>
              {ENCODING_WORDS[e]}
            </option>
          ))}
        </Select>
      </Field>
      <Field
        label={`Header row of ${name}`}
        hint={`Column names read from row ${found.headerRow}${choices.headerRow ? ' (as chosen)' : found.headerRow > 1 ? '; the rows above look like titles' : ''}.`}
      >
        <Select
          value={choices.headerRow ? String(choices.headerRow) : 'auto'}
          onChange={(_, d) => onChoose({ ...choices, headerRow: d.value === 'auto' ? undefined : Number(d.value) })}
          data-testid="file-header-row"
        >
          <option value="auto">Find it (row of names above the data)</option>
          {Array.from({ length: HEADER_ROWS }, (_, i) => (
            <option key={i} value={String(i + 1)}>
              Row {i + 1}
            </option>
          ))}
        </Select>
      </Field>
    </>
  );
}
