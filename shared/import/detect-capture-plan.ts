import type { TimeBaseOrigin } from '../contracts/capture.ts';
import { ImportError } from './import-error.ts';
import { parseQuantity, timeUnitToSi } from './parse-quantity.ts';
import { parseUnitLabel } from './parse-unit-label.ts';
import type { ParseScopeCsvOptions } from './parse-scope-csv-options.ts';
import { readSampleField, type ReadSampleFieldOptions } from './read-sample-field.ts';
import { sampleIntervalOutOfRange, timeOutOfRange } from './value-limits.ts';
import { DEFAULT_NUMERIC_SENTINELS, DEFAULT_TEXT_SENTINELS } from './sample-sentinels.ts';
import { splitFields, type Delimiter } from './split-fields.ts';
import { unitToSi } from './unit-to-si.ts';

export interface PlannedChannel {
  /** 0-based column in the file. */
  column: number;
  name: string;
  /** SI unit after conversion, or the unit as written when it is not known. */
  unit: string;
  sourceUnit: string;
  /** Multiply the file's number by this to get `unit`. */
  factor: number;
}

export type ColumnRole = 'time' | 'index' | 'channel' | 'empty' | 'side-metadata' | 'trailing';

/** A column read like a channel (in seconds) only to check or rebuild the time base; assembleCapture strips it. */
export interface TimeCheck {
  /** Index into `channels`. */
  channel: number;
  /** 0-based column in the file. */
  column: number;
  /** true: the printed times are too coarse and only anchor t0 of the rebuilt grid; false: a second time column
   * (channel blocks side by side) that must equal the time base. */
  rebuild: boolean;
}

/** Everything decided about a file before its body is read; the pure parser and the disk reader both follow it. */
export interface CapturePlan {
  delimiter: Delimiter;
  decimalComma: boolean;
  /** 1-based line numbers. */
  preambleLines: number;
  headerRows: number;
  dataStartLine: number;
  /** Last data line, or null when only the head of the file was seen. */
  dataEndLine: number | null;
  footerLines: number;
  /** Fields a data row must have at least (last data column + 1). */
  requiredFields: number;
  columnRoles: ColumnRole[];
  timeMode: 'column' | 'index' | 'samples';
  timeColumn: number | null;
  /** Multiply the time column by this to get seconds. */
  timeFactor: number;
  timeSourceUnit: string;
  indexColumn: number | null;
  /** For index and samples-only files: time of the first data row and sample interval, in seconds. */
  t0: number | null;
  dt: number | null;
  /** Where t0 and dt came from, for the user to check ("metadata 'Sample interval'", "options"). */
  timeSource: string;
  /** How the time base was found, in words a user can check (see TimeBaseOrigin). */
  timeOrigin: TimeBaseOrigin;
  /** Columns read at the end of `channels` only to check or rebuild the time base. */
  timeChecks: TimeCheck[];
  /** 'codes' when the values are raw converter codes, not volts. */
  valueKind: 'physical' | 'codes';
  channels: PlannedChannel[];
  recordLength: number | null;
  metadata: Record<string, string>;
  warnings: string[];
  fieldOptions: Required<ReadSampleFieldOptions>;
  precision: 'float64' | 'float32';
  uniformTolerance: number;
}

export interface DetectCapturePlanOptions extends ParseScopeCsvOptions {
  /** The lines are only the head of a larger file: no footer is looked for and the data may run on. @default false */
  partial?: boolean;
}

type Cell = 'num' | 'sentinel' | 'empty' | 'text';

const TIME_NAME = /^(time|t|zeit|tiempo|temps|tempo|x|x-axis|sec|seconds?)\b/i;
const INDEX_NAME = /^(index|idx|sample|samples|sample ?no\.?|no\.?|n|#|point|pt|nr\.?|sequence|seq)$/i;
/** Words a units row writes over a column of sample numbers. */
const INDEX_WORD = /^(sequence|index|points?|samples?|sample ?number|number)$/i;
/** Names that say a column is a channel, whatever its values do. */
const CHANNEL_NAME = /^(ch(annel)?\s*\d+|c\d+|[a-d]|gate\b.*|math\s*\d*|ref\s*\d*|ampl(itude)?|volt(age)?s?|signal|value)$/i;
/** Units-row words that stand for "no unit" or a unit this reader does not convert. */
const WEAK_UNIT = /^(values?|ampl(itude)?|a\.?u\.?|arb\.?|counts?|codes?|adc|none|n\/a|-+|\?+|db[a-z]*|%|div)$/i;
/** Products and powers of units ("V^2", "V*V", "Volt*Volt"), as math columns write them. */
const UNIT_EXPRESSION = /^[A-Za-z\u00b5\u03bc]+(\s*[\^*/·]\s*[A-Za-z\u00b5\u03bc0-9]+)+$/;
/** A line that only announces the data below it ("Waveform Data,"). */
const DATA_MARKER = /^(waveform ?data|data|samples|values|data ?points?|curve|waveform)\s*:?$/i;

// Keys of the time base as scope preambles write them (normalised: lower case, "_-." as spaces). A scale per
// division ("time base", "horizontal scale", "s/div") is never an interval, so none of these match it.
const KEYS = {
  dt: /^(sample ?interval|sampling ?interval|sampling ?period|sample ?period|sample ?time|x ?increment|xinc(r)?|increment|time ?increment|time ?interval|time ?step|horizontal ?interval|horizontal ?increment|dt|delta ?t|time ?resolution|time ?per ?(point|sample)|interval|sample ?spacing|x ?spacing|h ?resolution|horizontal ?resolution)$/,
  rate: /^(sample ?rate|sampling ?rate|sampling ?frequency|sample ?frequency|sa ?rate|fs)$/,
  t0: /^(start ?time|start|t0|x ?origin|xorg|x ?start|x ?zero|xzero|first ?sample ?time|time ?of ?first ?sample|first ?point ?time|horizontal ?offset|h ?offset|trigger ?offset|time ?offset|start ?x)$/,
  triggerIndex: /^(trigger ?position|trigger ?point|trigger ?index|trigger ?sample|trigger ?address|pre ?trigger ?samples|pretrigger)$/,
  length: /^(record ?length|points|number ?of ?points|number ?of ?samples|samples|sample ?count|n ?points|length|memory ?depth|memory ?length|block ?size)$/,
  names: /^(channel|channels|source|sources|channel ?names?|names?|labels?|traces?|trace ?names?)$/,
  units: /^(units?|vertical ?units?|v ?units?|y ?units?|yunit|channel ?units?|value ?units?|volt ?units?|amplitude ?units?)$/,
  timeUnit: /^(horizontal ?units?|h ?units?|x ?units?|xunit|time ?units?|horiz ?units?)$/,
  perDivision: /(volts? ?\/ ?div|v ?\/ ?div|vertical ?scale|volt ?scale|voltage ?per ?div(ision)?|volts ?per ?div(ision)?|vertical ?gain|v ?div)/,
};

/**
 * Works out the layout of a scope export from its lines: delimiter and decimal comma, the metadata preamble,
 * header rows and units, where the data starts and ends, which column is time, index or channel, side columns of
 * metadata, and the time base of files without a time column. Every choice can be forced through the options.
 * Throws ImportError, naming the line, when the file cannot be a capture.
 */
export function detectCapturePlan(lines: string[], options: DetectCapturePlanOptions = {}): CapturePlan {
  if (!Array.isArray(lines)) throw new TypeError('lines must be an array of strings');
  const {
    partial = false,
    precision = 'float64',
    uniformTolerance = 0.01,
    textSentinels = DEFAULT_TEXT_SENTINELS,
    numericSentinels = DEFAULT_NUMERIC_SENTINELS,
  } = options;
  if (precision !== 'float64' && precision !== 'float32') throw new RangeError("precision must be 'float64' or 'float32'");
  if (!(uniformTolerance >= 0)) throw new RangeError('uniformTolerance must be a number >= 0');
  const warnings: string[] = [];
  if (lines.every((l) => l.trim() === '')) throw new ImportError('the file is empty: there is no text in it');

  const delimiter = options.delimiter ?? detectDelimiter(lines);
  const decimalComma = options.decimalComma ?? (delimiter !== ',' && detectDecimalComma(lines, delimiter));
  if (decimalComma && delimiter === ',') throw new RangeError('a decimal comma needs a delimiter other than ","');
  const fieldOptions: Required<ReadSampleFieldOptions> = {
    decimalComma,
    // An empty cell inside a row ("+2.006E-03,,") is a gap: NaN, counted with the invalid samples.
    textSentinels: new Set([...textSentinels.map((s) => s.trim().toLowerCase()), '']),
    numericSentinels: new Set(numericSentinels),
  };
  // The fields of a line are split when first needed: a head of 256 KiB holds thousands of plain rows of numbers,
  // whose cells are known without splitting (plainRowCells), and few of which are ever looked at field by field.
  const splitRows: (string[] | undefined)[] = new Array(lines.length);
  // (No fields outside the lines, as for a blank line.)
  const row = (i: number): string[] => {
    if (!(i >= 0 && i < lines.length)) return [];
    return (splitRows[i] ??= lines[i].trim() === '' ? [] : splitFields(lines[i], delimiter));
  };
  const plain = plainRowCells(delimiter, fieldOptions);
  const cells = lines.map((line, i) => plain(line) ?? row(i).map((f) => classifyCell(f, fieldOptions)));
  const isBlank = (i: number) => cells[i].every((c) => c === 'empty');
  const isPure = (i: number) => cells[i].some((c) => c === 'num') && !cells[i].includes('text');

  // The data start is the first run of rows of numbers; a lone numeric line in a preamble does not start it.
  let start = -1;
  if (options.dataStartLine !== undefined) {
    if (!Number.isInteger(options.dataStartLine) || options.dataStartLine < 1) throw new RangeError('dataStartLine must be an integer >= 1');
    start = options.dataStartLine - 1;
    if (start >= lines.length) throw new ImportError(`the data was said to start at line ${options.dataStartLine}, but the file has ${lines.length} lines`);
  } else {
    // First choice: a row of numbers followed by two more of the same width. Else (files of one or two rows) the
    // first row of numbers.
    for (let i = 0; i < lines.length && start < 0; i++) {
      if (!isPure(i)) continue;
      let next = 0;
      let ok = true;
      for (let j = i + 1; j < lines.length && next < 2; j++) {
        if (isBlank(j)) continue;
        next++;
        if (!isPure(j) || cells[j].length !== cells[i].length) ok = false;
      }
      if (ok && next === 2) start = i;
    }
    if (start < 0) start = lines.findIndex((_, i) => isPure(i));
    if (start < 0) {
      let last = lines.length - 1;
      while (last > 0 && isBlank(last)) last--;
      const textLines = lines.filter((_, i) => !isBlank(i)).length;
      if (textLines > 50) {
        throw new ImportError(`no rows of numbers were found in ${textLines} lines${partial ? ' at the start of the file' : ''}; this does not look like an oscilloscope CSV export`, last + 1);
      }
      if (cells[last].length >= 2 || TIME_NAME.test(lines[last].trim())) {
        throw new ImportError('the header has no rows of samples after it', last + 1);
      }
      throw new ImportError('no rows of numbers were found; this does not look like an oscilloscope CSV export', last + 1);
    }
  }

  // The data ends at the last row of numbers; text after it is a footer.
  let end = lines.length - 1;
  while (end > start && !isPure(end)) end--;
  if (partial) end = lines.length - 1;
  const footer: number[] = [];
  for (let i = end + 1; i < lines.length; i++) if (!isBlank(i)) footer.push(i);

  // Column roles from the block of plain data rows.
  // The usual width of a data row decides the columns; a longer row is an error reported when it is read.
  const widths: number[] = [];
  for (let i = start; i <= end && widths.length < 1000; i++) if (isPure(i)) widths.push(cells[i].length);
  const columnCount = modeOf(widths);
  const hasNumber = new Array<boolean>(columnCount).fill(false);
  let numberColumns = 0;
  for (let i = start; i <= end && numberColumns < columnCount; i++) {
    if (!isPure(i)) continue;
    for (let col = 0; col < Math.min(columnCount, cells[i].length); col++) {
      if (!hasNumber[col] && (cells[i][col] === 'num' || cells[i][col] === 'sentinel')) {
        hasNumber[col] = true;
        numberColumns++;
      }
    }
  }
  const dataColumns = hasNumber.flatMap((h, col) => (h ? [col] : []));
  const requiredFields = dataColumns[dataColumns.length - 1] + 1;

  // Rows above the pure block whose data columns hold numbers and whose other columns hold text carry
  // metadata beside the data.
  const sideRows: number[] = [];
  if (options.dataStartLine === undefined) {
    while (start > 0) {
      const i = start - 1;
      const c = cells[i];
      const dataOk = dataColumns.every((col) => c[col] === 'num' || c[col] === 'sentinel');
      const sideText = c.some((cell, col) => cell === 'text' && !dataColumns.includes(col));
      if (!dataOk || !sideText) break;
      sideRows.unshift(i);
      start = i;
    }
  }
  for (let i = start; i <= end; i++) {
    if (!sideRows.includes(i) && !isPure(i) && !isBlank(i) && dataColumns.every((col) => cells[i][col] === 'num' || cells[i][col] === 'sentinel')
        && cells[i].some((cell, col) => cell === 'text' && !dataColumns.includes(col))) sideRows.push(i);
  }
  const sideColumns = new Set<number>();
  for (const i of sideRows) row(i).forEach((f, col) => { if (!dataColumns.includes(col) && f.trim() !== '') sideColumns.add(col); });

  // Header rows right above the data: names, optionally followed by a row of units. A names row may hold numeric
  // channel ids ("x-axis,1,2" over "second,Volt,Volt"); both rows may carry metadata in columns beyond the data
  // ("X,CH1,Start,Increment" over "Sequence,Volt,-6.0e-03,2.0e-06").
  let headerEnd = start; // exclusive index of the header block end (= start, no blank lines kept between)
  while (headerEnd > 0 && isBlank(headerEnd - 1)) headerEnd--;
  const field = (i: number, col: number) => (row(i)[col] ?? '').trim();
  const isNamesRow = (i: number, aboveUnits: boolean): boolean => {
    if (i < 0 || isBlank(i)) return false;
    const fields = row(i);
    const nonEmpty = fields.filter((f) => f.trim() !== '').length;
    const firstText = fields.find((f) => f.trim() !== '')?.trim() ?? '';
    if (nonEmpty === 1 && DATA_MARKER.test(firstText)) return false;
    // "#Points=4000", "Record length: 4000": a metadata line, not names.
    if (/^[#%]/.test(firstText) || (nonEmpty === 1 && /[=:]\s*[-+]?[\d.]/.test(firstText))) return false;
    const numeric = dataColumns.filter((col) => cells[i][col] === 'num');
    if (numeric.length > 0) {
      // Numbers in a names row are channel ids ("1", "2") beside a text label, and only above a units row.
      if (!aboveUnits || numeric.length === dataColumns.length) return false;
      if (!numeric.every((col) => /^\d{1,3}$/.test(field(i, col)))) return false;
    } else if (!aboveUnits && cells[i].includes('num')) {
      return false;
    }
    const inData = dataColumns.filter((col) => field(i, col) !== '').length;
    if (dataColumns.length === 1) return nonEmpty === 1 && inData === 1;
    return inData >= Math.max(1, dataColumns.length - 1);
  };
  const isUnitsRow = (i: number): boolean => {
    if (i < 1 || isBlank(i)) return false;
    let strong = 0;
    let filled = 0;
    for (const col of dataColumns) {
      const f = bareUnit(field(i, col));
      if (f === '') continue;
      filled++;
      const kind = unitKind(f);
      if (kind === null) return false;
      if (kind === 'strong') strong++;
    }
    if (filled === 0) return false;
    // A row of only weak words ("Value") counts when the row above is a names row.
    return strong > 0 || isNamesRow(i - 1, true);
  };
  let headerRows = 0;
  if (options.headerRows !== undefined) {
    if (![0, 1, 2].includes(options.headerRows)) throw new RangeError('headerRows must be 0, 1 or 2');
    headerRows = options.headerRows;
  } else if (isUnitsRow(headerEnd - 1) && isNamesRow(headerEnd - 2, true)) {
    headerRows = 2;
  } else if (isNamesRow(headerEnd - 1, false)) {
    headerRows = 1;
  }
  const headerStart = headerEnd - headerRows;
  if (headerStart < 0) throw new ImportError(`${headerRows} header rows were asked for, but the data starts at line ${start + 1}`);
  // A row of numbers right above the header or data, with the data's width, means the data was interrupted.
  for (let i = Math.max(0, headerStart - 3); i < headerStart; i++) {
    if (isPure(i) && cells[i].length === cells[start].length && options.dataStartLine === undefined) {
      let bad = i + 1;
      while (bad < headerStart && isPure(bad)) bad++;
      const found = row(bad).find((f, col) => dataColumns.includes(col) && classifyCell(f, fieldOptions) === 'text');
      throw new ImportError(`expected ${dataColumns.length} numbers, found '${(found ?? lines[bad]).trim().slice(0, 40)}'`, bad + 1);
    }
  }
  const names: string[] = [];
  const units: string[] = [];
  /** Words of a units row that are not units but say what a column is ("Sequence", "Value"). */
  const unitWords: string[] = [];
  if (headerRows >= 1) {
    for (const col of dataColumns) {
      const label = parseUnitLabel(row(headerStart)[col] ?? '');
      names[col] = label.name;
      units[col] = label.sourceUnit;
    }
    if (headerRows === 2) {
      for (const col of dataColumns) {
        const u = bareUnit(field(headerStart + 1, col));
        if (u === '') continue;
        if (unitToSi(u) !== null || timeUnitToSi(u) !== null) units[col] = u;
        else unitWords[col] = u.toLowerCase();
      }
    }
  }

  // Metadata: the preamble's key/value lines, key/value pairs in header columns beyond the data, side columns,
  // and footer lines. `where` keeps, per key, where it was found, so a user can check the time base's source.
  const metadata: Record<string, string> = {};
  const where: Record<string, string> = {};
  const addMeta = (key: string, value: string, at: string) => {
    const k = key.trim().replace(/^[#%;"',\s]+/, '').replace(/\s*[:=]$/, '').trim();
    if (k === '') return;
    metadata[k] = metadata[k] === undefined ? value : `${metadata[k]}; ${value}`;
    where[k] ??= at;
  };
  for (let i = 0; i < headerStart; i++) {
    if (isBlank(i)) continue;
    let fields = row(i).map((f) => f.trim());
    if (fields.filter((f) => f !== '').length === 1) {
      const m = /^([^:=\t]+?)\s*[:=\t]\s*(.*)$/.exec(fields.find((f) => f !== '') ?? '');
      if (m) fields = [m[1], m[2]];
    }
    const nonEmpty = fields.filter((f) => f !== '');
    addMeta(nonEmpty[0] ?? '', nonEmpty.slice(1).join(', '), `line ${i + 1}`);
  }
  if (headerRows >= 1) {
    const last = headerStart + headerRows - 1;
    for (let col = 0; col < cells[headerStart].length; col++) {
      if (dataColumns.includes(col)) continue;
      const key = field(headerStart, col);
      const value = headerRows === 2 ? field(last, col) : '';
      if (key !== '' && value !== '' && cells[headerStart][col] === 'text') {
        addMeta(key, value, `column ${col + 1} of the header rows (lines ${headerStart + 1}–${last + 1})`);
      }
    }
  }
  for (const i of sideRows) {
    const fields = row(i).map((f, col) => [f.trim(), col] as const).filter(([f, col]) => !dataColumns.includes(col) && f !== '');
    for (let k = 0; k < fields.length; k += 2) addMeta(fields[k][0], fields[k + 1]?.[0] ?? '', `line ${i + 1}, beside the data`);
  }
  for (const i of footer) {
    const nonEmpty = row(i).map((f) => f.trim()).filter((f) => f !== '');
    if (nonEmpty.length >= 2) addMeta(nonEmpty[0], nonEmpty.slice(1).join(', '), `line ${i + 1}, after the data`);
    else addMeta('footer', lines[i].trim(), `line ${i + 1}, after the data`);
  }
  const meta = readTimeMetadata(metadata, where, options.timeUnit ?? '', decimalComma);
  const dtGiven = options.dt ?? meta.dt;
  const dtFrom = options.dt !== undefined ? 'the interval you gave' : `\`${meta.dtKey}\` (${where[meta.dtKey] ?? 'the metadata'})`;

  // Which data column is time, which is an index, which are channels.
  let timeColumn: number | null = null;
  let indexColumn: number | null = null;
  let timeUnit = '';
  let timeUnitFrom = '';
  let timeAssumed = false;
  let coarse = options.coarseTime === true;
  let coarseLine = start + 1;
  /** 1-based line of the k-th data row (blank lines skipped). */
  const lineOfRow = (k: number) => {
    for (let i = start, seen = 0; i <= end; i++) {
      if (isBlank(i)) continue;
      if (seen++ === k) return i + 1;
    }
    return start + 1;
  };
  const checkColumns: number[] = [];
  const blockValues = (col: number, most = 50) => {
    const values: number[] = [];
    for (let i = start; i <= end && values.length < most; i++) {
      if (isBlank(i)) continue;
      const v = readSampleField(row(i)[col] ?? '', fieldOptions);
      if (v === undefined || Number.isNaN(v)) return null;
      values.push(v);
    }
    return values;
  };
  /** The unit factor among s, ms, µs, ns, ps that makes `step` the stated interval, or null. */
  const factorMatching = (step: number, tolerance: number): { factor: number; unit: string } | null => {
    if (dtGiven === null) return null;
    for (const [unit, factor] of [['s', 1], ['ms', 1e-3], ['us', 1e-6], ['ns', 1e-9], ['ps', 1e-12]] as const) {
      if (Math.abs(step * factor - dtGiven) <= tolerance * dtGiven) return { factor, unit };
    }
    return null;
  };
  if (options.timeColumn !== undefined || options.indexColumn !== undefined) {
    timeColumn = options.timeColumn ?? null;
    indexColumn = options.indexColumn ?? null;
    for (const [what, col] of [['timeColumn', timeColumn], ['indexColumn', indexColumn]] as const) {
      if (col !== null && !dataColumns.includes(col)) {
        throw new RangeError(`${what} ${col} is not a column of numbers (numeric columns: ${dataColumns.join(', ')})`);
      }
    }
    if (timeColumn !== null) {
      timeUnit = units[timeColumn] || options.timeUnit || meta.timeUnit || '';
      timeUnitFrom = units[timeColumn] ? 'as the header says' : options.timeUnit ? 'as you set it' : meta.timeUnit ? `as \`${meta.timeUnitKey}\` (${where[meta.timeUnitKey]}) says` : '';
    }
  } else if (dataColumns.length >= 2) {
    const first = dataColumns[0];
    const name = names[first] ?? '';
    const word = unitWords[first] ?? '';
    const values = blockValues(first, 400);
    const n = values?.length ?? 0;
    const nonDecreasing = values !== null && n >= 2 && values.every((v, k) => k === 0 || v >= values[k - 1]) && values[n - 1] > values[0];
    const counting = values !== null && n >= 2 && values.every((v, k) => Number.isInteger(v) && (k === 0 || v === values[k - 1] + 1));
    const declared = units[first] ?? '';
    const declaredTime = declared !== '' && (unitToSi(declared)?.si === 's' || timeUnitToSi(declared) !== null);
    let role: 'time' | 'index' | 'channel' = 'channel';
    if (headerRows > 0 && (INDEX_NAME.test(name) || INDEX_WORD.test(word))) role = 'index';
    else if (headerRows > 0 && (TIME_NAME.test(name) || declaredTime)) role = 'time';
    else if (headerRows > 0 && CHANNEL_NAME.test(name)) role = 'channel';
    else if (nonDecreasing) role = 'time';
    if (role === 'time' && counting && declared === '' && meta.timeUnit === '' && options.timeUnit === undefined) role = 'index';
    if (role === 'index' && !counting && values !== null && nonDecreasing && !INDEX_WORD.test(word) && !INDEX_NAME.test(name)) role = 'time';
    if (role === 'index') {
      if (dtGiven === null) {
        throw new ImportError(`the first column counts samples (${values?.slice(0, 3).join(', ') ?? '0, 1, 2'}, …) and the file gives no sample interval anywhere (no interval, increment, sample rate or start and step), so these are sample numbers, not times; give the sample interval (the "Fix how it is read" form on the shot page, or --dt for the command line)`, start + 1);
      }
      indexColumn = first;
    } else if (role === 'time' && values === null) {
      // A bad value in the first rows: the reader names its line.
      timeColumn = first;
      if (declared !== '') {
        timeUnit = declared;
        timeUnitFrom = 'as the header says';
      }
    } else if (role === 'time' && values !== null) {
      if (n >= 4 && isEnvelope(values)) {
        throw new ImportError(`every time appears twice in a row (${values[0]}, ${values[1]}, ${values[2]}, …): this is a min/max envelope record, not one sample per instant; export the waveform as plain samples (turn the envelope or peak-detect export off)`, start + 1);
      }
      const repeat = values.findIndex((v, k) => k > 0 && v === values[k - 1]);
      if (nonDecreasing && repeat > 0) {
        coarse = true;
        coarseLine = lineOfRow(repeat);
      }
      const step = n >= 2 ? (values[n - 1] - values[0]) / (n - 1) : NaN;
      if (declared !== '') {
        // A unit the header states wins; one that is not a time (a spectrum's Hz) is refused below.
        timeUnit = declared;
        timeUnitFrom = 'as the header says';
      } else if (options.timeUnit !== undefined) {
        timeUnit = options.timeUnit;
        timeUnitFrom = 'as you set it';
      }
      const stated = timeUnit || meta.timeUnit;
      const statedFactor = stated === '' ? null : (unitToSi(stated) ?? timeUnitToSi(stated))?.factor ?? null;
      // Coarsely printed times still step by the interval on average over the rows looked at, within a few %.
      const match = factorMatching(step, coarse ? 0.05 : 0.01);
      if (timeUnit !== '') {
        if (dtGiven !== null && !coarse && statedFactor !== null && Math.abs(step * statedFactor - dtGiven) > 0.01 * dtGiven) {
          warnings.push(`the time column's step (${fmt(step * statedFactor)}s) differs from the sample interval ${fmt(dtGiven)}s stated by ${dtFrom}; the time column was used`);
        }
      } else if (meta.timeUnit !== '' && (dtGiven === null || coarse || (statedFactor !== null && Math.abs(step * statedFactor - dtGiven) <= 0.01 * dtGiven))) {
        timeUnit = meta.timeUnit;
        timeUnitFrom = `as \`${meta.timeUnitKey}\` (${where[meta.timeUnitKey]}) says`;
      } else if (match !== null) {
        timeUnit = match.unit;
        timeUnitFrom = `the unit in which its step matches the interval stated by ${dtFrom}`;
        if (meta.timeUnit !== '') warnings.push(`the horizontal unit \`${meta.timeUnit}\` (${where[meta.timeUnitKey]}) disagrees with the time column, whose step matches the stated sample interval ${fmt(dtGiven as number)}s only in ${match.unit === 'us' ? 'µs' : match.unit}; ${match.unit === 'us' ? 'µs' : match.unit} used`);
      } else if (dtGiven !== null && !coarse && headerRows === 0) {
        // Without a header, a column that does not step by the stated interval is not a time column: every column
        // is then a channel of samples on the stated interval.
        role = 'channel';
      } else if (meta.timeUnit !== '') {
        timeUnit = meta.timeUnit;
        timeUnitFrom = `as \`${meta.timeUnitKey}\` (${where[meta.timeUnitKey]}) says`;
      }
      if (role === 'time') timeColumn = first;
    }
    // A second time column (channel blocks side by side, each with its own time) is checked, never a channel.
    if (timeColumn !== null) {
      const reference = blockValues(timeColumn, 400);
      for (const col of dataColumns) {
        if (col === timeColumn) continue;
        const other = blockValues(col, 400);
        if (reference === null || other === null || other.length < 20 || other.length !== reference.length) continue;
        // Strictly increasing from the same first time (or by the same step): no signal does that for hundreds of
        // samples, a time column always does. Whether it stays equal to the first is checked on every row.
        const increasing = other.every((v, k) => k === 0 || v > other[k - 1]);
        const last = other.length - 1;
        const sameStep = Math.abs((other[last] - other[0]) - (reference[last] - reference[0])) <= 0.01 * Math.abs(reference[last] - reference[0]);
        if (increasing && (other[0] === reference[0] || sameStep)) checkColumns.push(col);
      }
    }
  }

  // The time base.
  let timeMode: CapturePlan['timeMode'];
  let timeFactor = 1;
  let timeSourceUnit = '';
  let t0: number | null = null;
  let dt: number | null = null;
  let timeSource: string;
  let timeOrigin: TimeBaseOrigin;
  let rebuildFrom: number | null = null;
  let rebuildFactor = 1;
  if (timeColumn !== null) {
    timeSourceUnit = timeUnit;
    const si = timeSourceUnit === '' ? { si: 's', factor: 1 } : unitToSi(timeSourceUnit) ?? timeUnitToSi(timeSourceUnit);
    if (si === null || si.si !== 's') {
      throw new ImportError(`the time column's unit '${timeSourceUnit}' is not a unit of time; give timeUnit in the options`, headerStart + 1);
    }
    if (timeSourceUnit === '') {
      timeAssumed = true;
      warnings.push(coarse
        ? 'the printed times give no unit; seconds assumed for the start time'
        : 'the time column gives no unit and the file states no sample interval to check it against; seconds assumed');
    }
    timeFactor = si.factor;
    const label = names[timeColumn] ? ` ("${names[timeColumn]}")` : '';
    const unitText = timeSourceUnit === '' ? 'seconds assumed (no unit anywhere in the file)' : `in ${timeSourceUnit === 'us' ? 'µs' : timeSourceUnit} (${timeUnitFrom})`;
    if (coarse) {
      if (dtGiven === null) {
        throw new ImportError(`the printed times are too coarse for the sample interval: this row repeats the time of the row before it, and the file states no sample interval to rebuild them from; give the sample interval (the "Fix how it is read" form on the shot page, or --dt for the command line)`, coarseLine);
      }
      // Rebuild the grid from the stated interval; the printed times anchor t0 and are checked against it.
      rebuildFrom = timeColumn;
      rebuildFactor = timeFactor;
      timeMode = 'samples';
      dt = dtGiven;
      t0 = options.t0 ?? 0;
      timeColumn = null;
      timeSource = `dt from ${dtFrom}; the printed times of column ${rebuildFrom + 1} are too coarse and only anchor t0`;
      timeOrigin = { how: 'rebuilt', source: `every ${fmt(dt)}s from ${dtFrom}; column ${rebuildFrom + 1}${label} is printed too coarsely and only sets the start time (${unitText})`, assumed: timeAssumed };
      warnings.push(`the printed times of column ${rebuildFrom + 1} are too coarse for their offset (rows share the same time); the time base was rebuilt from the sample interval ${fmt(dt)}s stated by ${dtFrom}`);
    } else {
      timeMode = 'column';
      timeSource = 'time column';
      timeOrigin = { how: 'time-column', source: `column ${timeColumn + 1}${label}, ${unitText}`, assumed: timeAssumed };
    }
  } else {
    timeMode = indexColumn !== null ? 'index' : 'samples';
    dt = dtGiven;
    if (dt === null) {
      throw new ImportError('there is no time column and the file gives no sample interval; give dt (seconds) in the import options', start + 1);
    }
    if (!(dt > 0) || !Number.isFinite(dt)) throw new ImportError(`the sample interval ${dt} s is not a positive number`, meta.dtLine);
    const dtOutOfRange = sampleIntervalOutOfRange(dt);
    if (dtOutOfRange !== null) throw new ImportError(dtOutOfRange, options.dt !== undefined ? null : meta.dtLine);
    const dtSource = options.dt !== undefined ? 'options' : `metadata '${meta.dtKey}'`;
    let t0Words: string;
    if (options.t0 !== undefined) {
      t0 = options.t0;
      timeSource = `dt from ${dtSource}, t0 from options`;
      t0Words = 'the start you gave';
    } else if (meta.t0 !== null) {
      t0 = meta.t0;
      timeSource = `dt from ${dtSource}, t0 from metadata '${meta.t0Key}'`;
      t0Words = `\`${meta.t0Key}\` (${where[meta.t0Key]})`;
    } else if (meta.triggerIndex !== null) {
      t0 = -meta.triggerIndex * dt;
      timeSource = `dt from ${dtSource}, t0 from metadata '${meta.triggerKey}' (samples before the trigger)`;
      t0Words = `\`${meta.triggerKey}\` (${where[meta.triggerKey]}), samples before the trigger`;
    } else if (indexColumn !== null) {
      const values = blockValues(indexColumn);
      t0 = values !== null && values.length > 0 ? values[0] * dt : 0;
      timeSource = `dt from ${dtSource}, t0 = first index × dt (index counted from the trigger)`;
      t0Words = 'the first index × the interval';
    } else {
      t0 = 0;
      timeSource = `dt from ${dtSource}, t0 = 0 (the file gives no start time)`;
      t0Words = 'none given: the first sample is taken as t = 0';
      warnings.push('the file gives no start time; the first sample is taken as t = 0');
    }
    if (!Number.isFinite(t0)) throw new RangeError('t0 must be a finite number of seconds');
    const t0OutOfRange = timeOutOfRange(t0);
    if (t0OutOfRange !== null) throw new ImportError(`the start (from ${t0Words}): ${t0OutOfRange}`);
    timeOrigin = {
      how: options.dt !== undefined ? 'given' : 'metadata',
      source: `every ${fmt(dt)}s from ${dtFrom}${indexColumn !== null ? ` (column ${indexColumn + 1} counts the samples)` : ''}; start: ${t0Words}`,
      assumed: false,
    };
  }

  // Channels: every other data column.
  const channelColumns = dataColumns.filter((col) => col !== timeColumn && col !== indexColumn && col !== rebuildFrom && !checkColumns.includes(col));
  if (channelColumns.length === 0) throw new ImportError('the file has a time column but no channel of samples', start + 1);
  const metaNames = meta.names !== null && meta.names.length === channelColumns.length ? meta.names : null;
  if (options.channelNames !== undefined && options.channelNames.length !== channelColumns.length) {
    throw new RangeError(`channelNames has ${options.channelNames.length} names for ${channelColumns.length} channels`);
  }
  if (options.channelUnits !== undefined && options.channelUnits.length !== channelColumns.length) {
    throw new RangeError(`channelUnits has ${options.channelUnits.length} units for ${channelColumns.length} channels`);
  }
  let valueKind: 'physical' | 'codes' = 'physical';
  const channels = channelColumns.map((column, k): PlannedChannel => {
    const name = options.channelNames?.[k] ?? (names[column] || metaNames?.[k] || `CH${k + 1}`);
    const stated = options.channelUnits?.[k] ?? units[column];
    let sourceUnit = stated || meta.unitOf(name, k, channelColumns.length);
    let unit = '';
    let factor = 1;
    // Whole numbers after a "Waveform Data" marker in a file that gives a scale per division are converter codes,
    // even where a vertical-units key names the scale's unit (V): only a unit over the column itself makes volts.
    const codes = !stated && meta.dataMarker && meta.perDivision && timeMode === 'samples' && (blockValues(column, 400)?.every(Number.isInteger) ?? false);
    if (codes) sourceUnit = '';
    if (sourceUnit !== '') {
      const si = unitToSi(sourceUnit);
      if (si === null) warnings.push(`the unit '${sourceUnit}' of ${name} is not known; its values are kept as written`);
      unit = si?.si ?? sourceUnit;
      factor = si?.factor ?? 1;
    } else {
      const sample = blockValues(column, 400);
      if (sample !== null && sample.length > 0 && sample.every(Number.isInteger) && (meta.perDivision || meta.dataMarker)) {
        valueKind = 'codes';
        warnings.push(`the values of ${name} are whole numbers with no unit and the file gives only a scale per division: they are raw converter codes, not volts (timing does not need volts; levels and thresholds are in codes)`);
      } else {
        unit = 'V';
        sourceUnit = '';
        warnings.push(`the file gives no unit for ${name}; volts assumed`);
      }
    }
    return { column, name, unit, sourceUnit, factor };
  });
  // Columns read only to check or rebuild the time base: after the channels, stripped by assembleCapture.
  const timeChecks: TimeCheck[] = [];
  for (const col of checkColumns) {
    timeChecks.push({ channel: channels.length, column: col, rebuild: false });
    channels.push({ column: col, name: names[col] || `column ${col + 1}`, unit: 's', sourceUnit: units[col] || timeSourceUnit, factor: units[col] ? (unitToSi(units[col]) ?? timeUnitToSi(units[col]))?.factor ?? timeFactor : timeFactor });
  }
  if (rebuildFrom !== null) {
    timeChecks.push({ channel: channels.length, column: rebuildFrom, rebuild: true });
    channels.push({ column: rebuildFrom, name: names[rebuildFrom] || `column ${rebuildFrom + 1}`, unit: 's', sourceUnit: timeUnit, factor: rebuildFactor });
  }
  if (checkColumns.length > 0) {
    warnings.push(`column${checkColumns.length > 1 ? 's' : ''} ${checkColumns.map((c) => c + 1).join(', ')} repeat${checkColumns.length > 1 ? '' : 's'} the time column (channel blocks side by side); checked equal to it, not read as channels`);
  }

  // Columns with nothing in them.
  const columnRoles: ColumnRole[] = [];
  let widest = columnCount;
  for (const i of sideRows) widest = Math.max(widest, cells[i].length);
  for (let col = 0; col < widest; col++) {
    if (col === timeColumn || col === rebuildFrom || checkColumns.includes(col)) columnRoles.push('time');
    else if (col === indexColumn) columnRoles.push('index');
    else if (channelColumns.includes(col)) columnRoles.push('channel');
    else if (sideColumns.has(col)) columnRoles.push('side-metadata');
    else if (col === widest - 1 && col >= requiredFields) columnRoles.push('trailing');
    else {
      columnRoles.push('empty');
      warnings.push(`column ${col + 1} is empty and was ignored`);
    }
  }
  if (sideRows.length > 0) warnings.push(`metadata beside the data in column${sideColumns.size > 1 ? 's' : ''} ${[...sideColumns].sort((a, b) => a - b).map((c) => c + 1).join(', ')} was read and those columns ignored`);
  if (footer.length > 0) warnings.push(`${footer.length} footer line${footer.length > 1 ? 's' : ''} after the data ${footer.length > 1 ? 'were' : 'was'} read as metadata`);

  return {
    delimiter, decimalComma,
    preambleLines: headerStart,
    headerRows,
    dataStartLine: start + 1,
    dataEndLine: partial ? null : end + 1,
    footerLines: footer.length,
    requiredFields,
    columnRoles,
    timeMode, timeColumn, timeFactor, timeSourceUnit, indexColumn, t0, dt, timeSource,
    timeOrigin,
    timeChecks,
    valueKind,
    channels,
    recordLength: meta.length,
    metadata,
    warnings,
    fieldOptions,
    precision,
    uniformTolerance,
  };
}

/** True when the values come in equal consecutive pairs (t0, t0, t1, t1, …): a min/max envelope export. */
function isEnvelope(values: number[]): boolean {
  const pairs = Math.floor(values.length / 2);
  for (let k = 0; k < pairs; k++) {
    if (values[2 * k] !== values[2 * k + 1]) return false;
    if (k > 0 && !(values[2 * k] > values[2 * k - 1])) return false;
  }
  return pairs >= 2;
}

/** A units-row field without its brackets: "(ms)" → "ms". */
function bareUnit(text: string): string {
  return text.trim().replace(/^[([]\s*|\s*[)\]]$/g, '').trim();
}

/** 'strong' for a unit or an index word, 'weak' for words that stand for "no unit" ("Value"), null for anything else. */
function unitKind(text: string): 'strong' | 'weak' | null {
  if (unitToSi(text) !== null || timeUnitToSi(text) !== null || INDEX_WORD.test(text)) return 'strong';
  if (WEAK_UNIT.test(text) || UNIT_EXPRESSION.test(text)) return 'weak';
  return null;
}

/** 2e-7 → "200 ns": an interval as a person reads it off a scope (6 significant digits). */
function fmt(x: number): string {
  const a = Math.abs(x);
  const [scale, unit] = a === 0 || a >= 1 ? [1, ''] : a >= 1e-3 ? [1e3, 'm'] : a >= 1e-6 ? [1e6, 'µ'] : a >= 1e-9 ? [1e9, 'n'] : [1e12, 'p'];
  return `${Number((x * scale).toPrecision(6))} ${unit}`;
}

/**
 * The cells of a line of only plain numbers between single delimiters ("-1.5e-3,0.25,4"), known without splitting it:
 * every one 'num', in one array shared by all such lines of that width (the plan never changes it). Null for any
 * other line (spaces or text anywhere, an empty field: classifyCell decides), and for every line when the delimiter
 * is whitespace, the decimal a comma or a numeric sentinel below 1e36 in magnitude. Each field is NUMBER of
 * read-sample-field.ts with at most 17 digits before the point and a positive exponent of at most 19, so below
 * 10^36: no sentinel, within MAX_SAMPLE_MAGNITUDE, 'num' for classifyCell too; anything else goes to classifyCell.
 * One regular expression a line: a head of 256 KiB holds thousands of such rows, and this runs once, on cold code.
 */
export function plainRowCells(delimiter: Delimiter, options: Required<ReadSampleFieldOptions>): (line: string) => Cell[] | null {
  if (delimiter === 'whitespace' || options.decimalComma || [...options.numericSentinels].some((s) => !(Math.abs(s) >= 1e36))) return () => null;
  const field = String.raw`[-+]?(?:\d{1,17}(?:\.\d*)?|\.\d+)(?:[eE](?:-\d{1,4}|\+?0*1?\d))?`;
  const sep = delimiter === '\t' ? String.raw`\t` : delimiter;
  const plainRow = new RegExp(`^${field}(?:${sep}${field})*$`);
  const shared: Cell[][] = [];
  return (line) => {
    if (!plainRow.test(line)) return null;
    let fields = 1;
    for (let at = line.indexOf(delimiter); at >= 0; at = line.indexOf(delimiter, at + 1)) fields++;
    return (shared[fields] ??= new Array<Cell>(fields).fill('num'));
  };
}

function classifyCell(field: string, options: ReadSampleFieldOptions): Cell {
  if (field.trim() === '') return 'empty';
  const v = readSampleField(field, options);
  if (v === undefined) return 'text';
  return Number.isNaN(v) ? 'sentinel' : 'num';
}

/** Lines that look like rows of numbers: few characters outside digits, signs, exponents and delimiters. */
function numericLooking(lines: string[]): string[] {
  // The last 400 such lines are enough, and data sits at the end of a head: walk backwards.
  const out: string[] = [];
  for (let i = lines.length - 1; i >= 0 && out.length < 400; i--) {
    const t = lines[i].trim();
    if (t === '' || !/\d/.test(t)) continue;
    const other = t.replace(/[0-9eE+\-.,;\t "]/g, '').length;
    if (other / t.length <= 0.2) out.push(t);
  }
  return out.reverse();
}

function detectDelimiter(lines: string[]): Delimiter {
  const candidates = numericLooking(lines);
  for (const d of ['\t', ';', ','] as const) {
    const counts = candidates.map((l) => l.split(d).length);
    const mode = modeOf(counts);
    if (mode >= 2 && counts.filter((c) => c === mode).length >= 0.8 * counts.length) return d;
  }
  const ws = candidates.map((l) => l.split(/[ \t]+/).length);
  const mode = modeOf(ws);
  if (mode >= 2 && ws.filter((c) => c === mode).length >= 0.8 * ws.length) return 'whitespace';
  // One column of samples: the delimiter only matters for the preamble.
  const text = lines.slice(0, 50).join('\n');
  if (text.includes('\t')) return '\t';
  if (text.includes(';')) return ';';
  return ',';
}

function detectDecimalComma(lines: string[], delimiter: Delimiter): boolean {
  let comma = 0;
  let point = 0;
  for (const line of numericLooking(lines)) {
    for (const f of splitFields(line, delimiter)) {
      if (/^\s*[-+]?\d*,\d+(?:[eE][-+]?\d+)?\s*$/.test(f)) comma++;
      else if (/^\s*[-+]?\d*\.\d+(?:[eE][-+]?\d+)?\s*$/.test(f)) point++;
    }
  }
  return comma > 0 && comma >= point;
}

function modeOf(values: number[]): number {
  const counts = new Map<number, number>();
  let best = 0;
  let bestCount = 0;
  for (const v of values) {
    const c = (counts.get(v) ?? 0) + 1;
    counts.set(v, c);
    if (c > bestCount) {
      best = v;
      bestCount = c;
    }
  }
  return best;
}

interface TimeMetadata {
  dt: number | null;
  dtKey: string;
  dtLine: number | null;
  t0: number | null;
  t0Key: string;
  triggerIndex: number | null;
  triggerKey: string;
  length: number | null;
  names: string[] | null;
  timeUnit: string;
  timeUnitKey: string;
  /** The file gives a scale per division (volts/div): unscaled integers are then converter codes. */
  perDivision: boolean;
  /** The file announces its samples with a marker line ("Waveform Data"). */
  dataMarker: boolean;
  /** Unit of the k-th of n channels named `name`, from per-channel lists ("CH1:V, CH2:mV") or one shared unit. */
  unitOf: (name: string, k: number, n: number) => string;
}

/**
 * Reads the time base, channel names and units out of the metadata keys scope exports commonly use. Values may
 * carry channel prefixes and padding ("CH1:0.000002", "Analog:140000"), units in brackets ("2e-9(s)") or with an
 * upper-case S for seconds ("0.08uS").
 */
function readTimeMetadata(metadata: Record<string, string>, where: Record<string, string>, timeUnit: string, decimalComma: boolean): TimeMetadata {
  const out: TimeMetadata = {
    dt: null, dtKey: '', dtLine: null, t0: null, t0Key: '', triggerIndex: null, triggerKey: '',
    length: null, names: null, timeUnit: '', timeUnitKey: '', perDivision: false, dataMarker: false, unitOf: () => '',
  };
  let unitList: string[] | null = null;
  const list = (v: string) => v.split(/\s*[,;\t]\s*/).map((s) => s.trim()).filter((s) => s !== '' && s !== '?');
  // "SampleRate", "HResolution", "X_Increment", "Sample-interval" → "sample rate", "h resolution", "x increment", …
  const normalise = (name: string) => name.replace(/([a-z])([A-Z])/g, '$1 $2').replace(/([A-Z])([A-Z][a-z])/g, '$1 $2')
    .toLowerCase().replace(/[_\-.]+/g, ' ').replace(/\s+/g, ' ').trim();
  const lineOf = (key: string) => {
    const m = /^line (\d+)/.exec(where[key] ?? '');
    return m ? Number(m[1]) : null;
  };
  for (const [key, value] of Object.entries(metadata)) {
    const label = parseUnitLabel(key);
    const norm = normalise(label.name);
    if (KEYS.timeUnit.test(norm) && out.timeUnit === '') {
      const raw = list(value)[0] ?? '';
      const u = (/^[A-Za-z][A-Za-z0-9 _]{0,15}?\s*:\s*(.+)$/.exec(raw)?.[1] ?? raw).trim().replace(/^[([]|[)\]]$/g, '');
      if (u !== '' && (unitToSi(u)?.si === 's' || timeUnitToSi(u) !== null)) {
        out.timeUnit = u;
        out.timeUnitKey = key;
      }
    }
  }
  for (const [key, value] of Object.entries(metadata)) {
    const label = parseUnitLabel(key);
    const norm = normalise(label.name);
    const first = list(value)[0] ?? '';
    // A value without a unit is in seconds (the SI convention of exports), or in the unit its key or the user
    // names; never in the horizontal display unit, which describes the time column and may disagree with it.
    const timeDefault = label.sourceUnit || timeUnit;
    if (DATA_MARKER.test(norm)) out.dataMarker = true;
    if (KEYS.perDivision.test(norm) || /\/\s*div\b/i.test(value)) out.perDivision = true;
    if (KEYS.dt.test(norm) && out.dt === null) {
      const q = parseQuantity(first, { defaultUnit: timeDefault, decimalComma, time: true });
      if (q !== null && (q.si === 's' || q.si === '') && q.value > 0) {
        out.dt = q.value;
        out.dtKey = key;
        out.dtLine = lineOf(key);
      }
    } else if (KEYS.rate.test(norm) && out.dt === null) {
      const q = parseQuantity(first, { defaultUnit: label.sourceUnit, decimalComma });
      if (q !== null && (q.si === 'Hz' || q.si === '') && q.value > 0) {
        out.dt = 1 / q.value;
        out.dtKey = key;
        out.dtLine = lineOf(key);
      }
    } else if (KEYS.t0.test(norm) && out.t0 === null) {
      const q = parseQuantity(first, { defaultUnit: timeDefault, decimalComma, time: true });
      if (q !== null && (q.si === 's' || q.si === '')) {
        out.t0 = q.value;
        out.t0Key = key;
      }
    } else if (KEYS.triggerIndex.test(norm) && out.triggerIndex === null) {
      const q = parseQuantity(first, { decimalComma });
      if (q !== null && q.si === '' && Number.isInteger(q.value)) {
        out.triggerIndex = q.value;
        out.triggerKey = key;
      }
    } else if (KEYS.length.test(norm) && out.length === null) {
      const q = parseQuantity(first, { decimalComma });
      if (q !== null && q.si === '' && Number.isInteger(q.value) && q.value > 0) out.length = q.value;
    } else if (KEYS.names.test(norm) && out.names === null) {
      out.names = list(value);
    } else if (KEYS.units.test(norm) && unitList === null) {
      unitList = list(value);
    }
  }
  if (unitList !== null) {
    const items = unitList;
    // "CH1:V, CH2:mV": each unit belongs to the channel its prefix names (any case), not to the channel's name.
    const byName = new Map<string, string>();
    const plain: string[] = [];
    for (const item of items) {
      const m = /^([A-Za-z][A-Za-z0-9 _]{0,15}?)\s*:\s*(.+)$/.exec(item);
      if (m) byName.set(m[1].trim().toLowerCase(), m[2].trim());
      else plain.push(item);
    }
    const usable = (u: string | undefined) => u ?? '';
    out.unitOf = (name, k, n) => {
      const named = byName.get(name.trim().toLowerCase());
      if (named !== undefined) return usable(named);
      if (byName.size > 0) {
        const values = [...byName.values()];
        if (values.length === n) return usable(values[k]);
        if (values.every((v) => v === values[0])) return usable(values[0]);
        return '';
      }
      if (plain.length === n) return usable(plain[k]);
      if (plain.length === 1) return usable(plain[0]);
      return '';
    };
  }
  return out;
}
