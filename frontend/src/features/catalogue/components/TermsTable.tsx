import Box from '@mui/material/Box';
import Paper from '@mui/material/Paper';
import Table from '@mui/material/Table';
import TableBody from '@mui/material/TableBody';
import TableCell from '@mui/material/TableCell';
import TableContainer from '@mui/material/TableContainer';
import TableHead from '@mui/material/TableHead';
import TableRow from '@mui/material/TableRow';
import type { TermsResponse } from '@kinpath/contracts';
import { formatCount } from '../../imports/words';

/** "Current" and "Next" as words in a bordered tag: never marked by colour alone. */
function TermTag({ children, strong }: { children: string; strong?: boolean }) {
  return (
    <Box
      component="span"
      sx={{
        display: 'inline-block',
        ml: 1,
        px: 0.75,
        border: 1,
        borderRadius: 1,
        fontSize: '0.8rem',
        fontWeight: 700,
        lineHeight: 1.6,
        borderColor: strong ? 'primary.main' : 'text.secondary',
        color: strong ? 'primary.main' : 'text.secondary',
      }}
    >
      {children}
    </Box>
  );
}

/** Every known term, newest first, with its term data and offerings and the current and next term marked. */
export function TermsTable({ terms, labelledBy }: { terms: TermsResponse; labelledBy: string }) {
  const newestFirst = [...terms.terms].reverse();
  return (
    <TableContainer component={Paper} variant="outlined" sx={{ maxWidth: 520 }}>
      <Table aria-labelledby={labelledBy}>
        <TableHead>
          <TableRow>
            <TableCell>Term</TableCell>
            <TableCell align="right">Term data rows</TableCell>
            <TableCell align="right">Offerings</TableCell>
          </TableRow>
        </TableHead>
        <TableBody>
          {newestFirst.map((term) => {
            const current = term.term === terms.current;
            const next = term.term === terms.next;
            return (
              <TableRow key={term.term} selected={current}>
                <TableCell
                  component="th"
                  scope="row"
                  sx={{ whiteSpace: 'nowrap', fontWeight: current || next ? 700 : 400 }}
                >
                  {term.term}
                  {current ? <TermTag strong>Current</TermTag> : null}
                  {next ? <TermTag>Next</TermTag> : null}
                </TableCell>
                <TableCell align="right">
                  {term.records === 0 ? '—' : formatCount(term.records)}
                </TableCell>
                <TableCell align="right">{formatCount(term.offerings)}</TableCell>
              </TableRow>
            );
          })}
        </TableBody>
      </Table>
    </TableContainer>
  );
}
