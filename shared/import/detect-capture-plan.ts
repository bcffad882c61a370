import { ImportError } from './import-error.ts';
import { parseQuantity } from './parse-quantity.ts';
import { parseUnitLabel } from './parse-unit-label.ts';
import type { ParseScopeCsvOptions } from './parse-scope-csv-options.ts';
import { readSampleField, type ReadSampleFieldOptions } from './read-sample-field.ts';
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

const TIME_NAME = /^(time|t|zeit|tiempo|temps|tempo|x|sec|seconds?)\b/i;
const INDEX_NAME = /^(index|idx|sample|samples|sample ?no\.?|no\.?|n|#|point|pt|nr\.?)$/i;

const KEYS = {
  dt: /^(sample ?interval|sampling ?interval|sampling ?period|sample ?period|x ?increment|increment|time ?increment|time ?step|horizontal ?interval|dt|delta ?t|time ?resolution|interval)$/,
  rate: /^(sample ?rate|sampling ?rate|sampling ?frequency|sample ?frequency|fs)$/,
  t0: /^(start ?time|start|t0|x ?origin|x ?start|first ?sample ?time|time ?of ?first ?sample|horizontal ?offset|trigger ?offset)$/,
  triggerIndex: /^(trigger ?position|trigger ?point|trigger ?index|trigger ?sample|pre ?trigger ?samples|pretrigger)$/,
  length: /^(record ?length|points|number ?of ?points|number ?of ?samples|samples|sample ?count|n ?points|length)$/,
  names: /^(channel|channels|source|sources|channel ?names?|names?|labels?|traces?)$/,
  units: /^(units?|vertical ?units?|y ?units?|channel ?units?)$/,
  timeUnit: /^(horizontal ?units?|x ?units?|time ?units?)$/,
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
    textSentinels: new Set(textSentinels.map((s) => s.trim().toLowerCase())),
    numericSentinels: new Set(numericSentinels),
  };
  const rows = lines.map((line) => (line.trim() === '' ? [] : splitFields(line, delimiter)));
  const cells = rows.map((fields) => fields.map((f) => classifyCell(f, fieldOptions)));
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
        if (!isPure(j) || rows[j].length !== rows[i].length) ok = false;
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
      if (rows[last].length >= 2 || TIME_NAME.test(lines[last].trim())) {
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
  for (let i = start; i <= end && widths.length < 1000; i++) if (isPure(i)) widths.push(rows[i].length);
  const columnCount = modeOf(widths);
  const hasNumber = new Array<boolean>(columnCount).fill(false);
  for (let i = start; i <= end; i++) {
    if (!isPure(i)) continue;
    for (let col = 0; col < Math.min(columnCount, cells[i].length); col++) {
      if (cells[i][col] === 'num' || cells[i][col] === 'sentinel') hasNumber[col] = true;
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
  for (const i of sideRows) rows[i].forEach((f, col) => { if (!dataColumns.includes(col) && f.trim() !== '') sideColumns.add(col); });

  // Header rows: names, optionally followed by a row of units.
  let headerEnd = start; // exclusive index of the header block end (= start, no blank lines kept between)
  while (headerEnd > 0 && isBlank(headerEnd - 1)) headerEnd--;
  const isHeaderRow = (i: number): boolean => {
    if (i < 0 || isBlank(i) || cells[i].includes('num')) return false;
    const nonEmpty = rows[i].filter((f) => f.trim() !== '').length;
    const inData = dataColumns.filter((col) => (rows[i][col] ?? '').trim() !== '').length;
    if (dataColumns.length === 1) return nonEmpty === 1 && inData === 1;
    return inData >= Math.max(1, dataColumns.length - 1) && rows[i].length >= requiredFields - 1;
  };
  const isUnitRow = (i: number) => dataColumns.every((col) => {
    const f = (rows[i][col] ?? '').trim().replace(/^[([]|[)\]]$/g, '');
    return f === '' || unitToSi(f) !== null;
  });
  let headerRows = 0;
  if (options.headerRows !== undefined) {
    if (![0, 1, 2].includes(options.headerRows)) throw new RangeError('headerRows must be 0, 1 or 2');
    headerRows = options.headerRows;
  } else if (isHeaderRow(headerEnd - 1)) {
    headerRows = isUnitRow(headerEnd - 1) && isHeaderRow(headerEnd - 2) && !isUnitRow(headerEnd - 2) ? 2 : 1;
  }
  const headerStart = headerEnd - headerRows;
  if (headerStart < 0) throw new ImportError(`${headerRows} header rows were asked for, but the data starts at line ${start + 1}`);
  // A row of numbers right above the header or data, with the data's width, means the data was interrupted.
  for (let i = Math.max(0, headerStart - 3); i < headerStart; i++) {
    if (isPure(i) && rows[i].length === rows[start].length && options.dataStartLine === undefined) {
      let bad = i + 1;
      while (bad < headerStart && isPure(bad)) bad++;
      const found = rows[bad]?.find((f, col) => dataColumns.includes(col) && classifyCell(f, fieldOptions) === 'text');
      throw new ImportError(`expected ${dataColumns.length} numbers, found '${(found ?? lines[bad]).trim().slice(0, 40)}'`, bad + 1);
    }
  }
  const names: string[] = [];
  const units: string[] = [];
  if (headerRows >= 1) {
    const nameRow = rows[headerStart];
    for (const col of dataColumns) {
      const label = parseUnitLabel(nameRow[col] ?? '');
      names[col] = label.name;
      units[col] = label.sourceUnit;
    }
    if (headerRows === 2) {
      for (const col of dataColumns) {
        const u = (rows[headerStart + 1][col] ?? '').trim().replace(/^[([]|[)\]]$/g, '');
        if (u !== '') units[col] = u;
      }
    }
  }

  // Metadata: the preamble's key/value lines, side columns, and footer lines.
  const metadata: Record<string, string> = {};
  const addMeta = (key: string, value: string) => {
    const k = key.trim().replace(/^[#%;"']+\s*/, '').replace(/\s*[:=]$/, '').trim();
    if (k === '') return;
    metadata[k] = metadata[k] === undefined ? value : `${metadata[k]}; ${value}`;
  };
  for (let i = 0; i < headerStart; i++) {
    if (isBlank(i)) continue;
    let fields = rows[i].map((f) => f.trim());
    if (fields.filter((f) => f !== '').length === 1) {
      const m = /^([^:=\t]+?)\s*[:=\t]\s*(.*)$/.exec(fields.find((f) => f !== '') ?? '');
      if (m) fields = [m[1], m[2]];
    }
    const nonEmpty = fields.filter((f) => f !== '');
    addMeta(nonEmpty[0] ?? '', nonEmpty.slice(1).join(', '));
  }
  for (const i of sideRows) {
    const fields = rows[i].filter((_, col) => !dataColumns.includes(col)).map((f) => f.trim()).filter((f) => f !== '');
    for (let k = 0; k < fields.length; k += 2) addMeta(fields[k], fields[k + 1] ?? '');
  }
  for (const i of footer) {
    const nonEmpty = rows[i].map((f) => f.trim()).filter((f) => f !== '');
    if (nonEmpty.length >= 2) addMeta(nonEmpty[0], nonEmpty.slice(1).join(', '));
    else addMeta('footer', lines[i].trim());
  }
  const meta = readTimeMetadata(metadata, options.timeUnit ?? '', decimalComma);

  // Which data column is time, which is an index, which are channels.
  let timeColumn: number | null = null;
  let indexColumn: number | null = null;
  const blockValues = (col: number) => {
    const values: number[] = [];
    for (let i = start; i <= end && values.length < 50; i++) {
      if (isBlank(i)) continue;
      const v = readSampleField(rows[i][col] ?? '', fieldOptions);
      if (v === undefined || Number.isNaN(v)) return null;
      values.push(v);
    }
    return values;
  };
  if (options.timeColumn !== undefined || options.indexColumn !== undefined) {
    timeColumn = options.timeColumn ?? null;
    indexColumn = options.indexColumn ?? null;
    for (const [what, col] of [['timeColumn', timeColumn], ['indexColumn', indexColumn]] as const) {
      if (col !== null && !dataColumns.includes(col)) {
        throw new RangeError(`${what} ${col} is not a column of numbers (numeric columns: ${dataColumns.join(', ')})`);
      }
    }
  } else if (dataColumns.length >= 2) {
    const first = dataColumns[0];
    const name = names[first] ?? '';
    const unit = units[first] ?? '';
    const values = blockValues(first);
    const increasing = values !== null && values.length >= 2 && values.every((v, k) => k === 0 || v > values[k - 1]);
    const unitIsTime = unitToSi(unit)?.si === 's';
    if (headerRows > 0 && INDEX_NAME.test(name)) indexColumn = first;
    else if (headerRows > 0 && (TIME_NAME.test(name) || unitIsTime)) timeColumn = first;
    else if (headerRows === 0 && increasing && values.every((v, k) => k === 0 || v === values[k - 1] + 1)
             && values.every(Number.isInteger) && (meta.dt !== null || options.dt !== undefined)) indexColumn = first;
    else if (headerRows === 0 && increasing) {
      // Without a header an increasing first column is a time column, unless the metadata gives a sample
      // interval its steps do not match (then every column is a channel of samples).
      const dtKnown = options.dt ?? meta.dt;
      const step = values[1] - values[0];
      if (dtKnown === null || Math.abs(step - dtKnown) <= 0.01 * dtKnown) timeColumn = first;
    }
  }

  // The time base.
  let timeMode: CapturePlan['timeMode'];
  let timeFactor = 1;
  let timeSourceUnit = '';
  let t0: number | null = null;
  let dt: number | null = null;
  let timeSource: string;
  if (timeColumn !== null) {
    timeMode = 'column';
    timeSourceUnit = units[timeColumn] || options.timeUnit || meta.timeUnit || '';
    const si = timeSourceUnit === '' ? { si: 's', factor: 1 } : unitToSi(timeSourceUnit);
    if (si === null || si.si !== 's') {
      throw new ImportError(`the time column's unit '${timeSourceUnit}' is not a unit of time; give timeUnit in the options`, headerStart + 1);
    }
    if (timeSourceUnit === '') warnings.push('the time column gives no unit; seconds assumed');
    timeFactor = si.factor;
    timeSource = 'time column';
  } else {
    timeMode = indexColumn !== null ? 'index' : 'samples';
    dt = options.dt ?? meta.dt;
    if (dt === null) {
      throw new ImportError('there is no time column and the file gives no sample interval; give dt (seconds) in the import options', start + 1);
    }
    if (!(dt > 0) || !Number.isFinite(dt)) throw new ImportError(`the sample interval ${dt} s is not a positive number`, meta.dtLine);
    const dtSource = options.dt !== undefined ? 'options' : `metadata '${meta.dtKey}'`;
    if (options.t0 !== undefined) {
      t0 = options.t0;
      timeSource = `dt from ${dtSource}, t0 from options`;
    } else if (meta.t0 !== null) {
      t0 = meta.t0;
      timeSource = `dt from ${dtSource}, t0 from metadata '${meta.t0Key}'`;
    } else if (meta.triggerIndex !== null) {
      t0 = -meta.triggerIndex * dt;
      timeSource = `dt from ${dtSource}, t0 from metadata '${meta.triggerKey}' (samples before the trigger)`;
    } else if (indexColumn !== null) {
      const values = blockValues(indexColumn);
      t0 = values !== null && values.length > 0 ? values[0] * dt : 0;
      timeSource = `dt from ${dtSource}, t0 = first index × dt (index counted from the trigger)`;
    } else {
      t0 = 0;
      timeSource = `dt from ${dtSource}, t0 = 0 (the file gives no start time)`;
      warnings.push('the file gives no start time; the first sample is taken as t = 0');
    }
    if (!Number.isFinite(t0)) throw new RangeError('t0 must be a finite number of seconds');
  }

  // Channels: every other data column.
  const channelColumns = dataColumns.filter((col) => col !== timeColumn && col !== indexColumn);
  if (channelColumns.length === 0) throw new ImportError('the file has a time column but no channel of samples', start + 1);
  const metaNames = meta.names !== null && meta.names.length === channelColumns.length ? meta.names : null;
  const metaUnits = meta.units !== null && (meta.units.length === channelColumns.length || meta.units.length === 1) ? meta.units : null;
  if (options.channelNames !== undefined && options.channelNames.length !== channelColumns.length) {
    throw new RangeError(`channelNames has ${options.channelNames.length} names for ${channelColumns.length} channels`);
  }
  if (options.channelUnits !== undefined && options.channelUnits.length !== channelColumns.length) {
    throw new RangeError(`channelUnits has ${options.channelUnits.length} units for ${channelColumns.length} channels`);
  }
  const channels = channelColumns.map((column, k): PlannedChannel => {
    const name = options.channelNames?.[k] ?? (names[column] || metaNames?.[k] || `CH${k + 1}`);
    const sourceUnit = options.channelUnits?.[k] ?? (units[column] || metaUnits?.[metaUnits.length === 1 ? 0 : k] || '');
    const si = sourceUnit === '' ? null : unitToSi(sourceUnit);
    if (sourceUnit !== '' && si === null) warnings.push(`the unit '${sourceUnit}' of ${name} is not known; its values are kept as written`);
    return { column, name, unit: si?.si ?? sourceUnit, sourceUnit, factor: si?.factor ?? 1 };
  });

  // Columns with nothing in them.
  const columnRoles: ColumnRole[] = [];
  let widest = columnCount;
  for (const i of sideRows) widest = Math.max(widest, rows[i].length);
  for (let col = 0; col < widest; col++) {
    if (col === timeColumn) columnRoles.push('time');
    else if (col === indexColumn) columnRoles.push('index');
    else if (channelColumns.includes(col)) columnRoles.push('channel');
    else if (sideColumns.has(col)) columnRoles.push('side-metadata');
    else if (col === widest - 1 && col >= requiredFields) columnRoles.push('trailing');
    else {
      columnRoles.push('empty');
      warnings.push(`column ${col + 1} is empty and was ignored`);
    }
  }
  if (sideRows.length > 0) warnings.push(`metadata beside the data in column${sideColumns.size > 1 ? 's' : ''} ${[...sideColumns].map((c) => c + 1).join(', ')} was read and those columns ignored`);
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
    channels,
    recordLength: meta.length,
    metadata,
    warnings,
    fieldOptions,
    precision,
    uniformTolerance,
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
  units: string[] | null;
  timeUnit: string;
}

/** Reads the time base, channel names and units out of the metadata keys scope exports commonly use. */
function readTimeMetadata(metadata: Record<string, string>, timeUnit: string, decimalComma: boolean): TimeMetadata {
  const out: TimeMetadata = {
    dt: null, dtKey: '', dtLine: null, t0: null, t0Key: '', triggerIndex: null, triggerKey: '',
    length: null, names: null, units: null, timeUnit: '',
  };
  const list = (v: string) => v.split(/\s*[,;\t]\s*/).map((s) => s.trim()).filter((s) => s !== '');
  for (const [key, value] of Object.entries(metadata)) {
    const label = parseUnitLabel(key);
    const norm = label.name.toLowerCase().replace(/[_\-.]+/g, ' ').replace(/\s+/g, ' ').trim();
    if (KEYS.timeUnit.test(norm)) out.timeUnit = list(value)[0] ?? '';
  }
  for (const [key, value] of Object.entries(metadata)) {
    const label = parseUnitLabel(key);
    const norm = label.name.toLowerCase().replace(/[_\-.]+/g, ' ').replace(/\s+/g, ' ').trim();
    const first = list(value)[0] ?? '';
    const timeDefault = label.sourceUnit || timeUnit || out.timeUnit;
    if (KEYS.dt.test(norm) && out.dt === null) {
      const q = parseQuantity(first, timeDefault, decimalComma);
      if (q !== null && (q.si === 's' || q.si === '')) {
        out.dt = q.value;
        out.dtKey = key;
      }
    } else if (KEYS.rate.test(norm) && out.dt === null) {
      const q = parseQuantity(first, label.sourceUnit, decimalComma);
      if (q !== null && (q.si === 'Hz' || q.si === '') && q.value > 0) {
        out.dt = 1 / q.value;
        out.dtKey = key;
      }
    } else if (KEYS.t0.test(norm) && out.t0 === null) {
      const q = parseQuantity(first, timeDefault, decimalComma);
      if (q !== null && (q.si === 's' || q.si === '')) {
        out.t0 = q.value;
        out.t0Key = key;
      }
    } else if (KEYS.triggerIndex.test(norm) && out.triggerIndex === null) {
      const q = parseQuantity(first, '', decimalComma);
      if (q !== null && q.si === '' && Number.isInteger(q.value)) {
        out.triggerIndex = q.value;
        out.triggerKey = key;
      }
    } else if (KEYS.length.test(norm) && out.length === null) {
      const q = parseQuantity(first, '', decimalComma);
      if (q !== null && q.si === '' && Number.isInteger(q.value) && q.value > 0) out.length = q.value;
    } else if (KEYS.names.test(norm) && out.names === null) {
      out.names = list(value);
    } else if (KEYS.units.test(norm) && out.units === null) {
      out.units = list(value);
    }
  }
  return out;
}
