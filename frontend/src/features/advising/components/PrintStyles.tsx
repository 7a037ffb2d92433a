import GlobalStyles from '@mui/material/GlobalStyles';

/**
 * The student page on paper: header, history, shortlist with its estimates, and the cautions.
 * Navigation, controls, notes and the full electives table stay on screen.
 */
export function PrintStyles() {
  return (
    <GlobalStyles
      styles={{
        '@media print': {
          '@page': { margin: '14mm 12mm' },
          'body, main': { background: '#FFFFFF !important', color: '#000000 !important' },
          'header.MuiAppBar-root, nav, .kp-no-print, button, .MuiDrawer-root, .MuiDialog-root, a[href="#main-content"]':
            { display: 'none !important' },
          main: { padding: '0 !important' },
          '.kp-student-page': { display: 'flex !important', flexDirection: 'column', gap: '12px' },
          '.kp-print-order-1': { order: 1 },
          '.kp-print-order-2': { order: 2 },
          '.kp-print-order-3': { order: 3 },
          '.kp-print-order-4': { order: 4 },
          '.MuiPaper-root': {
            border: 'none !important',
            boxShadow: 'none !important',
            padding: '0 !important',
          },
          '.MuiTableContainer-root': { overflow: 'visible !important', border: '1px solid #999' },
          table: { fontSize: '9.5pt' },
          'tr, .MuiChip-root': { breakInside: 'avoid' },
          thead: { display: 'table-header-group' },
          '.MuiChip-root': {
            border: '1px solid #666 !important',
            background: 'none !important',
            color: '#000 !important',
            height: 'auto',
          },
          '.kp-print-only': { display: 'block !important' },
          // Sorting means nothing on paper: the header text stays, the arrow goes.
          '.MuiTableSortLabel-icon': { display: 'none !important' },
        },
        '.kp-print-only': { display: 'none' },
      }}
    />
  );
}
