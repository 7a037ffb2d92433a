import type { Header, RowData } from '@tanstack/react-table';
import { flexRender } from '@tanstack/react-table';
import TableCell from '@mui/material/TableCell';
import TableSortLabel from '@mui/material/TableSortLabel';

/** A column header whose sort control is a button, with the current order in `aria-sort`. */
export function SortableHeaderCell<T extends RowData>({ header }: { header: Header<T, unknown> }) {
  const column = header.column;
  const numeric = column.columnDef.meta?.numeric;
  const content = flexRender(column.columnDef.header, header.getContext());
  if (!column.getCanSort()) {
    return (
      <TableCell align={numeric ? 'right' : 'left'} scope="col">
        {content}
      </TableCell>
    );
  }
  const sorted = column.getIsSorted();
  return (
    <TableCell
      align={numeric ? 'right' : 'left'}
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
