import type { ReactNode } from 'react';
import {
  flexRender,
  type Cell,
  type Header,
  type Row,
  type RowData,
  type Table as TableModel,
} from '@tanstack/react-table';
import type { SxProps, Theme } from '@mui/material/styles';
import { scrollRegionProps, useSidewaysOverflow } from '../lib/scroll-region';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TablePagination from '@mui/material/TablePagination';
import TableRow, { type TableRowProps } from '@mui/material/TableRow';
import TableSortLabel from '@mui/material/TableSortLabel';

/** Rows shown in a body of their own under a heading row, such as one term of a history. */
export interface RowGroup<T> {
  id: string;
  heading: ReactNode;
  rows: Row<T>[];
}

/** A body row's props: selection, `aria-current`, `data-` attributes, its own styles. */
type DataRowProps = TableRowProps & { [attribute: `data-${string}`]: string | undefined };

interface DataTableProps<T extends RowData> {
  table: TableModel<T>;
  /** The id of the heading that names the table. */
  labelledBy?: string;
  /** A caption above the table, naming it where no heading does. */
  caption?: ReactNode;
  /** Said in one full-width row when no row is shown; without it, an empty table stays empty. */
  empty?: ReactNode;
  dense?: boolean;
  /** Shades the row under the pointer, for tables whose rows are read across or acted on. */
  hover?: boolean;
  /**
   * Always focusable and named, so a narrow window can be scrolled sideways from the keyboard.
   * Without it, the table becomes so only while it is wider than its box.
   */
  scrollable?: boolean;
  /** Styles of the table element: padding and header wrapping. */
  sx?: SxProps<Theme>;
  rowProps?: (row: Row<T>) => DataRowProps;
  /** Styles of one body cell, for a column or a row that needs its own. */
  cellSx?: (cell: Cell<T, unknown>) => SxProps<Theme> | undefined;
  /** Rows in bodies of their own, each headed by a row header; otherwise the table's rows. */
  groups?: RowGroup<T>[];
}

/** A column header whose sort control is a button, with the current order in `aria-sort`. */
function HeaderCell<T extends RowData>({ header }: { header: Header<T, unknown> }) {
  const column = header.column;
  const align = column.columnDef.meta?.numeric ? 'right' : 'left';
  const content = flexRender(column.columnDef.header, header.getContext());
  if (!column.getCanSort()) {
    return (
      <TableCell align={align} scope="col">
        {content}
      </TableCell>
    );
  }
  const sorted = column.getIsSorted();
  return (
    <TableCell
      align={align}
      scope="col"
      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}
    >
      <TableSortLabel
        active={sorted !== false}
        direction={sorted === 'desc' ? 'desc' : 'asc'}
        onClick={column.getToggleSortingHandler()}
      >
        {content}
      </TableSortLabel>
    </TableCell>
  );
}

/**
 * Kinpath's tables: a TanStack table drawn with MUI, numbers right-aligned, sortable headers,
 * an optional empty-state row and, for tables with a pagination row model, a pager beneath.
 */
export function DataTable<T extends RowData>({
  table,
  labelledBy,
  caption,
  empty,
  dense,
  hover,
  scrollable,
  sx,
  rowProps,
  cellSx,
  groups,
}: DataTableProps<T>) {
  const rows = table.getRowModel().rows;
  const width = table.getVisibleLeafColumns().length;
  const sideways = useSidewaysOverflow<HTMLDivElement>();
  // Client-side pages; a table paged by the server (the audit trail) keeps its own pager.
  const paginated = table.options.getPaginationRowModel !== undefined;
  const { pageIndex, pageSize } = table.getState().pagination;
  const total = paginated ? table.getPrePaginationRowModel().rows.length : 0;

  const bodyRow = (row: Row<T>) => (
    <TableRow key={row.id} hover={hover} {...rowProps?.(row)}>
      {row.getVisibleCells().map((cell) => (
        <TableCell
          key={cell.id}
          align={cell.column.columnDef.meta?.numeric ? 'right' : 'left'}
          sx={cellSx?.(cell)}
        >
          {flexRender(cell.column.columnDef.cell, cell.getContext())}
        </TableCell>
      ))}
    </TableRow>
  );
  const emptyRow =
    rows.length === 0 && empty !== undefined ? (
      <TableRow>
        <TableCell colSpan={width}>{empty}</TableCell>
      </TableRow>
    ) : null;

  return (
    <TableContainer
      component={Paper}
      variant="outlined"
      ref={sideways.ref}
      {...(scrollable || sideways.overflowing
        ? scrollRegionProps({ labelledBy, label: labelledBy ? undefined : 'Table' })
        : {})}
    >
      <Table aria-labelledby={labelledBy} size={dense ? 'small' : undefined} sx={sx}>
        {caption ? (
          <caption style={{ captionSide: 'top', textAlign: 'left' }}>{caption}</caption>
        ) : null}
        <TableHead>
          {table.getHeaderGroups().map((group) => (
            <TableRow key={group.id}>
              {group.headers.map((header) => (
                <HeaderCell key={header.id} header={header} />
              ))}
            </TableRow>
          ))}
        </TableHead>
        {groups ? (
          <>
            {/* One body per group, headed by a row header that names it for every row in it. */}
            {groups.map((group) => (
              <TableBody key={group.id}>
                <TableRow sx={{ bgcolor: 'action.hover', breakInside: 'avoid' }}>
                  <TableCell
                    component="th"
                    scope="rowgroup"
                    colSpan={width}
                    sx={{ fontWeight: 700 }}
                  >
                    {group.heading}
                  </TableCell>
                </TableRow>
                {group.rows.map(bodyRow)}
              </TableBody>
            ))}
            {emptyRow ? <TableBody>{emptyRow}</TableBody> : null}
          </>
        ) : (
          <TableBody>
            {rows.map(bodyRow)}
            {emptyRow}
          </TableBody>
        )}
      </Table>
      {paginated && total > pageSize ? (
        <TablePagination
          component="div"
          count={total}
          page={pageIndex}
          onPageChange={(_, page) => table.setPageIndex(page)}
          rowsPerPage={pageSize}
          rowsPerPageOptions={[pageSize]}
        />
      ) : null}
    </TableContainer>
  );
}
