import type XlsxPopulate from 'xlsx-populate';

/**
 * Three workbook features xlsx-populate 1.21 has no API for: sheet protection, unlocked input cells
 * and the "quote prefix" that keeps text such as "=SUM(…)" from becoming a formula when edited.
 * They are set on the library's in-memory XML nodes, which are private; every access goes through
 * `expectNode`, so an upgrade that changes them fails loudly here (and in the workbook tests, which
 * read the written XML back) instead of silently writing an unprotected workbook.
 */

interface XmlNode {
  name: string;
  attributes: Record<string, string | number>;
  children: Array<XmlNode | string | number>;
}

function isXmlNode(value: unknown): value is XmlNode {
  return typeof value === 'object' && value !== null
    && typeof (value as XmlNode).name === 'string'
    && typeof (value as XmlNode).attributes === 'object'
    && Array.isArray((value as XmlNode).children);
}

function expectNode(value: unknown, what: string): XmlNode {
  if (!isXmlNode(value)) throw new Error(`xlsx-populate internals changed: ${what} not found`);
  return value;
}

/** Children are matched by name only: some nodes xlsx-populate builds itself lack `attributes`. */
function childIndex(node: XmlNode, name: string): number {
  return node.children.findIndex((c) => typeof c === 'object' && c !== null && c.name === name);
}

/** The cell's own cell-format (xf) node; calling `style` first gives the cell a style of its own. */
function cellFormatNode(cell: XlsxPopulate.Cell): XmlNode {
  cell.style('bold');
  const style = (cell as unknown as { _style?: { _xfNode?: unknown } })._style;
  return expectNode(style?._xfNode, 'cell format node');
}

/**
 * Marks a cell as editable on a protected sheet. Call it after the cell's other styles: the
 * `protection` child must follow `alignment` inside the format node, and later alignment changes
 * would be appended after it.
 */
export function unlockCell(cell: XlsxPopulate.Cell): void {
  const xf = cellFormatNode(cell);
  const existing = childIndex(xf, 'protection');
  if (existing >= 0) xf.children.splice(existing, 1);
  const extLst = childIndex(xf, 'extLst');
  const protection: XmlNode = { name: 'protection', attributes: { locked: 0 }, children: [] };
  if (extLst >= 0) xf.children.splice(extLst, 0, protection);
  else xf.children.push(protection);
  xf.attributes['applyProtection'] = 1;
}

/** Stores text so that spreadsheet apps keep showing it as text even when the cell is edited. */
export function markAsText(cell: XlsxPopulate.Cell): void {
  cellFormatNode(cell).attributes['quotePrefix'] = 1;
}

/**
 * Protects a sheet without a password: locked cells cannot be edited, unlocked ones can, and rows
 * and columns may still be resized. No password, because protection here guides the person filling
 * the sheet in rather than securing anything: the server re-checks every cell on upload.
 */
export function protectSheet(sheet: XlsxPopulate.Sheet): void {
  const node = expectNode((sheet as unknown as { _node?: unknown })._node, 'sheet node');
  const existing = childIndex(node, 'sheetProtection');
  if (existing >= 0) node.children.splice(existing, 1);
  const protection: XmlNode = {
    name: 'sheetProtection',
    attributes: { sheet: 1, objects: 1, scenarios: 1, formatColumns: 0, formatRows: 0 },
    children: [],
  };
  // The schema puts sheetProtection right after sheetData; xlsx-populate inserts its own later
  // nodes (merges, validations, margins) relative to the nodes that follow, so this stays in order.
  const data = childIndex(node, 'sheetData');
  if (data < 0) throw new Error('xlsx-populate internals changed: sheetData not found');
  node.children.splice(data + 1, 0, protection);
}

export interface DecimalValidation {
  operator: 'greaterThan' | 'greaterThanOrEqual';
  /** The bound, as formula text ("0"). */
  bound: string;
  title: string;
  error: string;
  /** Shown when the cell is selected; omitted when empty. */
  prompt?: string;
}

/**
 * Adds a "decimal number" validation to a cell or range. Every attribute is given, because
 * xlsx-populate writes a missing one as the invalid text "undefined"; and its always-written empty
 * `formula2` is dropped, since a one-bound rule has none.
 */
export function addDecimalValidation(sheet: XlsxPopulate.Sheet, address: string, rule: DecimalValidation): void {
  sheet.dataValidation(address, {
    type: 'decimal',
    operator: rule.operator,
    formula1: rule.bound,
    allowBlank: true,
    showInputMessage: Boolean(rule.prompt),
    promptTitle: rule.prompt ? rule.title : '',
    prompt: rule.prompt ?? '',
    showErrorMessage: true,
    errorTitle: rule.title,
    error: rule.error,
  });
  const validations = (sheet as unknown as { _dataValidations?: Record<string, unknown> })._dataValidations;
  const node = expectNode(validations?.[address], 'data validation node');
  const formula2 = childIndex(node, 'formula2');
  if (formula2 >= 0) node.children.splice(formula2, 1);
}
