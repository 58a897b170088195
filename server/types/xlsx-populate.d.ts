// xlsx-populate 1.21 ships no typings. This declares only the part of its API Tendara uses; widen it
// here (not with casts at the call sites) when a new method is needed.
declare module 'xlsx-populate' {
  namespace XlsxPopulate {
    /** Styles accepted by Cell#style / Range#style (a subset; see the library's README). */
    interface StyleMap {
      bold?: boolean;
      italic?: boolean;
      fontSize?: number;
      fontColor?: string;
      fill?: string | { type: 'solid'; color: string | { rgb: string } };
      border?: boolean | Record<string, unknown>;
      borderColor?: string;
      horizontalAlignment?: 'left' | 'center' | 'right' | 'general';
      verticalAlignment?: 'top' | 'center' | 'bottom';
      wrapText?: boolean;
      numberFormat?: string;
      indent?: number;
    }

    interface DataValidation {
      type: 'whole' | 'decimal' | 'list' | 'date' | 'time' | 'textLength' | 'custom';
      allowBlank?: boolean;
      showInputMessage?: boolean;
      prompt?: string;
      promptTitle?: string;
      showErrorMessage?: boolean;
      error?: string;
      errorTitle?: string;
      operator?: 'between' | 'notBetween' | 'equal' | 'notEqual' | 'lessThan' | 'lessThanOrEqual' | 'greaterThan' | 'greaterThanOrEqual';
      formula1: string;
      formula2?: string;
    }

    /** What a cell can hold once read: rich text and error values come back as objects. */
    type CellValue = string | number | boolean | Date | undefined | object;

    interface Cell {
      value(): CellValue;
      value(value: string | number | boolean | Date | null | undefined): Cell;
      /** The formula text, "SHARED" for a cell that reuses another's shared formula, or undefined. */
      formula(): string | undefined;
      formula(formula: string): Cell;
      style(name: string): unknown;
      style(styles: StyleMap): Cell;
      style(name: string, value: unknown): Cell;
      address(opts?: { includeSheetName?: boolean }): string;
      rowNumber(): number;
      columnNumber(): number;
      sheet(): Sheet;
    }

    interface Row {
      cell(columnNameOrNumber: string | number): Cell;
      hasCell(columnNumber: number): boolean;
      height(): number | undefined;
      height(height: number): Row;
      rowNumber(): number;
    }

    interface Column {
      width(): number | undefined;
      width(width: number): Column;
    }

    interface Range {
      value(): CellValue[][];
      style(styles: StyleMap): Range;
      merged(merged: boolean): Range;
      cells(): Cell[][];
      endCell(): Cell;
      startCell(): Cell;
      address(opts?: { includeSheetName?: boolean }): string;
    }

    interface Sheet {
      name(): string;
      name(name: string): Sheet;
      cell(address: string): Cell;
      cell(rowNumber: number, columnNumber: number): Cell;
      row(rowNumber: number): Row;
      column(columnNameOrNumber: string | number): Column;
      range(address: string): Range;
      usedRange(): Range | undefined;
      forEachExistingRow(callback: (row: Row, rowNumber: number) => void): Sheet;
      dataValidation(address: string, validation: DataValidation): Sheet;
      freezePanes(topLeftCell: string): Sheet;
      gridLinesVisible(visible: boolean): Sheet;
      tabSelected(selected: boolean): Sheet;
      active(active: boolean): Sheet;
    }

    interface Workbook {
      sheet(nameOrIndex: string | number): Sheet | undefined;
      sheets(): Sheet[];
      addSheet(name: string, indexOrBeforeSheet?: number | string | Sheet): Sheet;
      deleteSheet(sheet: string | number | Sheet): Workbook;
      moveSheet(sheet: string | number | Sheet, indexOrBeforeSheet?: number | string | Sheet): Workbook;
      property(name: string, value: string): Workbook;
      outputAsync(): Promise<Buffer>;
      toFileAsync(path: string): Promise<void>;
    }
  }

  const XlsxPopulate: {
    fromBlankAsync(): Promise<XlsxPopulate.Workbook>;
    fromDataAsync(data: Buffer | ArrayBuffer | Uint8Array, opts?: { password?: string }): Promise<XlsxPopulate.Workbook>;
    fromFileAsync(path: string, opts?: { password?: string }): Promise<XlsxPopulate.Workbook>;
  };
  export = XlsxPopulate;
}
