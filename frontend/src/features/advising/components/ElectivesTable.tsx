import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type CellContext,
  type SortingState,
} from '@tanstack/react-table';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import Checkbox from '@mui/material/Checkbox';
import FormControlLabel from '@mui/material/FormControlLabel';
import Switch from '@mui/material/Switch';
import TextField from '@mui/material/TextField';
import Typography from '@mui/material/Typography';
import type { ElectiveEstimate, EstimateBasis, EstimateConfidence } from '@kinpath/contracts';
import { DataTable } from '../../../components/DataTable';
import { BASIS_LABELS, CONFIDENCE_LABELS, plural } from '../format';
import {
  BasisChip,
  ConfidenceLabel,
  Fit,
  KinCount,
  PredictedGrade,
  PredictedSatisfaction,
  VisuallyHidden,
} from './EstimateCells';

export interface ElectiveFilters {
  department: string;
  eligibleOnly: boolean;
  basis: EstimateBasis | '';
  confidence: EstimateConfidence | '';
  /** Kin strength of every estimate from kin at least this ('' for any). */
  minStrength: string;
}

export const DEFAULT_FILTERS: ElectiveFilters = {
  department: '',
  // Ineligible electives are one switch away; the first view is what the student can take.
  eligibleOnly: true,
  basis: '',
  confidence: '',
  minStrength: '',
};

/** The weakest kin strength among an elective's estimates from kin (Infinity with none). */
export function weakestStrength(e: ElectiveEstimate): number {
  let weakest = Infinity;
  if (e.bases.grade === 'neighbours') weakest = Math.min(weakest, e.kinStrength.grade);
  if (e.bases.satisfaction === 'neighbours')
    weakest = Math.min(weakest, e.kinStrength.satisfaction);
  return weakest;
}

const CONFIDENCE_ORDER: Record<EstimateConfidence, number> = { low: 0, medium: 1, high: 2 };
const BASIS_ORDER: Record<EstimateBasis, number> = { none: 0, baseline: 1, neighbours: 2 };

export function applyFilters(electives: ElectiveEstimate[], filters: ElectiveFilters) {
  return electives.filter(
    (e) =>
      (!filters.eligibleOnly || e.eligible) &&
      (!filters.department || e.department === filters.department) &&
      (!filters.basis || e.basis === filters.basis) &&
      (!filters.confidence || e.confidence === filters.confidence) &&
      (filters.minStrength === '' ||
        !(Number(filters.minStrength) >= 0) ||
        (weakestStrength(e) !== Infinity && weakestStrength(e) >= Number(filters.minStrength))),
  );
}

// Missing estimates sort last in either direction: "no estimate" is not a low score.
const orNone = (value: number | null) => value ?? undefined;

interface ElectivesTableProps {
  electives: ElectiveEstimate[];
  term: string;
  labelledBy: string;
  shortlisted: ReadonlySet<string>;
  /** Absent for roles that keep no shortlist: no shortlist column then. */
  onShortlistChange?: (courseCode: string, shortlisted: boolean) => void;
  onWhy: (elective: ElectiveEstimate) => void;
}

const column = createColumnHelper<ElectiveEstimate>();

/**
 * The shortlist box. One component for the table's whole life: a cell function made anew when
 * the shortlist changes would be a new component type, and React would replace the box the
 * advisor just ticked, dropping keyboard focus to the page.
 */
function ShortlistCell({ row, table }: CellContext<ElectiveEstimate, unknown>) {
  const e = row.original;
  const meta = table.options.meta;
  return (
    <Checkbox
      size="small"
      checked={meta?.shortlisted?.has(e.courseCode) ?? false}
      onChange={(event) => meta?.onShortlistChange?.(e.courseCode, event.target.checked)}
      slotProps={{ input: { 'aria-label': `Shortlist ${e.courseCode} ${e.title}` } }}
      sx={{ p: 0.5 }}
    />
  );
}

export function ElectivesTable({
  electives,
  term,
  labelledBy,
  shortlisted,
  onShortlistChange,
  onWhy,
}: ElectivesTableProps) {
  const [filters, setFilters] = useState<ElectiveFilters>(DEFAULT_FILTERS);
  const [sorting, setSorting] = useState<SortingState>([{ id: 'fit', desc: true }]);

  const departments = useMemo(
    () => [...new Set(electives.map((e) => e.department))].sort(),
    [electives],
  );
  const rows = useMemo(() => applyFilters(electives, filters), [electives, filters]);

  const columns = useMemo(
    () => [
      column.accessor((e) => (shortlisted.has(e.courseCode) ? 1 : 0), {
        id: 'shortlist',
        header: 'Shortlist',
        sortDescFirst: true,
        cell: ShortlistCell,
      }),
      column.accessor('courseCode', {
        header: 'Course',
        cell: (info) => (
          <Box component="span" sx={{ whiteSpace: 'nowrap', fontWeight: 700 }}>
            {info.getValue()}
          </Box>
        ),
      }),
      column.accessor('title', {
        header: 'Title',
        cell: ({ row }) => {
          const e = row.original;
          return (
            <>
              {e.title}
              {!e.eligible ? (
                <Typography
                  component="span"
                  sx={{ display: 'block', fontSize: '0.8rem', color: 'text.secondary' }}
                >
                  <strong>Not eligible:</strong>{' '}
                  {e.ineligibleReasons.map((r) => r.message).join(' ') || 'no reason recorded.'}
                </Typography>
              ) : null}
            </>
          );
        },
      }),
      column.accessor('department', { header: 'Department' }),
      column.accessor((e) => orNone(e.predictedGrade), {
        id: 'predictedGrade',
        header: 'Predicted grade',
        sortUndefined: 'last',
        meta: { numeric: true },
        cell: ({ row }) => <PredictedGrade elective={row.original} />,
      }),
      // Sorted by kin strength: counts are mostly k, strength tells the sets apart.
      column.accessor((e) => e.kinStrength.grade, {
        id: 'gradeKin',
        header: () => (
          <>
            Kin<VisuallyHidden> for grade, with kin strength</VisuallyHidden>
          </>
        ),
        meta: { numeric: true },
        cell: ({ row }) => (
          <KinCount
            count={row.original.neighbours.grade}
            strength={row.original.kinStrength.grade}
          />
        ),
      }),
      column.accessor((e) => orNone(e.predictedSatisfaction), {
        id: 'predictedSatisfaction',
        header: 'Predicted satisfaction',
        sortUndefined: 'last',
        meta: { numeric: true },
        cell: ({ row }) => <PredictedSatisfaction elective={row.original} />,
      }),
      // Sorted by kin strength: counts are mostly k, strength tells the sets apart.
      column.accessor((e) => e.kinStrength.satisfaction, {
        id: 'satisfactionKin',
        header: () => (
          <>
            Kin<VisuallyHidden> for satisfaction, with kin strength</VisuallyHidden>
          </>
        ),
        meta: { numeric: true },
        cell: ({ row }) => (
          <KinCount
            count={row.original.neighbours.satisfaction}
            strength={row.original.kinStrength.satisfaction}
          />
        ),
      }),
      column.accessor((e) => orNone(e.fit), {
        id: 'fit',
        header: 'Fit',
        sortUndefined: 'last',
        meta: { numeric: true },
        cell: ({ row }) => <Fit elective={row.original} />,
      }),
      column.accessor((e) => CONFIDENCE_ORDER[e.confidence], {
        id: 'confidence',
        header: 'Confidence',
        cell: ({ row }) => <ConfidenceLabel confidence={row.original.confidence} />,
      }),
      column.accessor((e) => BASIS_ORDER[e.basis], {
        id: 'basis',
        header: 'Basis',
        cell: ({ row }) => <BasisChip basis={row.original.basis} />,
      }),
      column.display({
        id: 'why',
        header: () => <VisuallyHidden>Explanation</VisuallyHidden>,
        cell: ({ row }) => (
          <Button
            size="small"
            variant="outlined"
            onClick={() => onWhy(row.original)}
            sx={{ minWidth: 0, px: 1 }}
            aria-label={`Why? ${row.original.courseCode} ${row.original.title}`}
            aria-haspopup="dialog"
          >
            Why?
          </Button>
        ),
      }),
    ],
    [shortlisted, onWhy],
  );

  const table = useReactTable({
    data: rows,
    meta: { shortlisted, onShortlistChange },
    columns,
    state: { sorting, columnVisibility: { shortlist: onShortlistChange !== undefined } },
    onSortingChange: setSorting,
    // A header click flips the order; there is always one, so rows never fall back to arrival order.
    enableSortingRemoval: false,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getRowId: (e) => e.courseCode,
  });
  const shown = table.getRowModel().rows;
  const set = <K extends keyof ElectiveFilters>(key: K, value: ElectiveFilters[K]) =>
    setFilters((current) => ({ ...current, [key]: value }));

  return (
    <Box>
      <Box
        className="kp-no-print"
        role="group"
        aria-label="Filter electives"
        sx={{ display: 'flex', gap: 2, alignItems: 'center', flexWrap: 'wrap', mb: 1.5 }}
      >
        <TextField
          select
          label="Department"
          value={filters.department}
          onChange={(event) => set('department', event.target.value)}
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
          sx={{ width: 170 }}
        >
          <option value="">All departments</option>
          {departments.map((d) => (
            <option key={d} value={d}>
              {d}
            </option>
          ))}
        </TextField>
        <TextField
          select
          label="Basis"
          value={filters.basis}
          onChange={(event) => set('basis', event.target.value as ElectiveFilters['basis'])}
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
          sx={{ width: 210 }}
        >
          <option value="">Any basis</option>
          {(['neighbours', 'baseline', 'none'] as const).map((b) => (
            <option key={b} value={b}>
              {BASIS_LABELS[b]}
            </option>
          ))}
        </TextField>
        <TextField
          select
          label="Confidence"
          value={filters.confidence}
          onChange={(event) =>
            set('confidence', event.target.value as ElectiveFilters['confidence'])
          }
          slotProps={{ select: { native: true }, inputLabel: { shrink: true } }}
          sx={{ width: 180 }}
        >
          <option value="">Any confidence</option>
          {(['high', 'medium', 'low'] as const).map((c) => (
            <option key={c} value={c}>
              {CONFIDENCE_LABELS[c]}
            </option>
          ))}
        </TextField>
        <TextField
          label="Kin strength at least"
          value={filters.minStrength}
          onChange={(event) => set('minStrength', event.target.value)}
          error={filters.minStrength !== '' && !(Number(filters.minStrength) >= 0)}
          helperText={
            filters.minStrength !== '' && !(Number(filters.minStrength) >= 0)
              ? 'Enter a number of 0 or more.'
              : undefined
          }
          slotProps={{ htmlInput: { inputMode: 'decimal' }, inputLabel: { shrink: true } }}
          sx={{ width: 170 }}
        />
        <FormControlLabel
          control={
            <Switch
              checked={filters.eligibleOnly}
              onChange={(event) => set('eligibleOnly', event.target.checked)}
            />
          }
          label="Eligible only"
        />
        <Typography role="status" className="kp-figures" sx={{ color: 'text.secondary' }}>
          {shown.length === electives.length
            ? `${plural(electives.length, 'elective')} for ${term}`
            : `${shown.length} of ${plural(electives.length, 'elective')} for ${term}`}
        </Typography>
      </Box>
      <DataTable
        table={table}
        labelledBy={labelledBy}
        sx={{
          // Tight cells: every column, "Why?" included, fits a 1366 px window without scrolling.
          '& td, & th': { px: 0.75 },
          // Two-line headers keep the numeric columns narrow enough for the row's "Why?".
          '& thead th': { whiteSpace: 'normal', verticalAlign: 'bottom', lineHeight: 1.25 },
        }}
        hover
        rowProps={(row) => ({
          selected: shortlisted.has(row.original.courseCode),
          sx: row.original.eligible ? undefined : { '& td': { color: 'text.secondary' } },
        })}
        empty={
          electives.length === 0
            ? `No electives are offered in ${term}.`
            : filters.eligibleOnly
              ? 'No elective matches these filters. Turn off “Eligible only” to see the others and why they are closed.'
              : 'No elective matches these filters.'
        }
      />
    </Box>
  );
}
