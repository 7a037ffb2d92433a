import '@tanstack/react-table';
import type { RowData } from '@tanstack/react-table';

declare module '@tanstack/react-table' {
  // Column hints shared by Kinpath's tables.
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface ColumnMeta<TData extends RowData, TValue> {
    /** Numbers and dates: right-aligned, tabular figures. */
    numeric?: boolean;
  }

  // What a table's cells read that is not in their row: the student's shortlist.
  // eslint-disable-next-line @typescript-eslint/no-unused-vars
  interface TableMeta<TData extends RowData> {
    shortlisted?: ReadonlySet<string>;
    onShortlistChange?: (courseCode: string, add: boolean) => void;
  }
}
