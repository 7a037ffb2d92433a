import { createTheme } from '@mui/material/styles';

/**
 * Kinpath's palette: pine for structure and actions, clay for accents, warm paper behind dense
 * tables. Every text pairing below meets WCAG AA (4.5:1) on the surfaces it is used on.
 */
export const KINPATH_COLOURS = {
  pine: '#1F5C58',
  pineDeep: '#163E3B',
  pineMist: '#C9E4DF',
  pineLight: '#7CC6BE',
  clay: '#9B4A22',
  clayLight: '#E89A72',
  paper: '#F5F4EF',
  ink: '#1D2326',
  slate: '#4E5A5F',
  // 3.8:1 on white: enough for input borders and other non-text boundaries (WCAG 1.4.11).
  boundary: '#7A8488',
  night: '#14191B',
  nightSurface: '#1C2326',
} as const;

const FONT_STACK = '"Atkinson Hyperlegible", "Segoe UI", system-ui, sans-serif';

export const theme = createTheme({
  cssVariables: { colorSchemeSelector: 'media' },
  colorSchemes: {
    light: {
      palette: {
        primary: {
          main: KINPATH_COLOURS.pine,
          dark: KINPATH_COLOURS.pineDeep,
          contrastText: '#FFFFFF',
        },
        secondary: { main: KINPATH_COLOURS.clay, contrastText: '#FFFFFF' },
        error: { main: '#A8322D' },
        warning: { main: '#8A5A00' },
        info: { main: '#2D5B87' },
        success: { main: '#2E6B34' },
        background: { default: KINPATH_COLOURS.paper, paper: '#FFFFFF' },
        text: { primary: KINPATH_COLOURS.ink, secondary: KINPATH_COLOURS.slate },
        divider: '#D5D3CB',
      },
    },
    dark: {
      palette: {
        primary: { main: KINPATH_COLOURS.pineLight, contrastText: KINPATH_COLOURS.night },
        secondary: { main: KINPATH_COLOURS.clayLight, contrastText: KINPATH_COLOURS.night },
        error: { main: '#E9A0A0' },
        warning: { main: '#E3C07A' },
        info: { main: '#9CC3E6' },
        success: { main: '#9AD0A0' },
        background: { default: KINPATH_COLOURS.night, paper: KINPATH_COLOURS.nightSurface },
        text: { primary: '#E3E6E4', secondary: '#A5B0B3' },
        divider: '#3A4447',
      },
    },
  },
  shape: { borderRadius: 6 },
  typography: {
    fontFamily: FONT_STACK,
    fontSize: 14,
    h1: { fontSize: '1.75rem', fontWeight: 700, lineHeight: 1.25 },
    h2: { fontSize: '1.25rem', fontWeight: 700, lineHeight: 1.3 },
    h3: { fontSize: '1.05rem', fontWeight: 700, lineHeight: 1.35 },
    button: { textTransform: 'none', fontWeight: 700 },
    overline: { letterSpacing: '0.08em', fontWeight: 700 },
  },
  components: {
    MuiCssBaseline: {
      styleOverrides: (t) => ({
        ':root': { '--kp-focus-ring': t.vars?.palette.primary.main ?? KINPATH_COLOURS.pine },
        body: { fontFeatureSettings: '"kern"' },
        ':focus-visible': { outline: '3px solid var(--kp-focus-ring)', outlineOffset: 2 },
        // Figures line up in columns wherever numbers are shown (the font carries tabular figures).
        'table, .kp-figures': { fontVariantNumeric: 'tabular-nums' },
      }),
    },
    MuiButtonBase: {
      defaultProps: { disableRipple: true },
      styleOverrides: {
        root: {
          '&.Mui-focusVisible': { outline: '3px solid var(--kp-focus-ring)', outlineOffset: 2 },
        },
      },
    },
    MuiButton: { defaultProps: { disableElevation: true } },
    MuiTextField: { defaultProps: { size: 'small', fullWidth: true } },
    MuiOutlinedInput: {
      styleOverrides: {
        notchedOutline: ({ theme: t }) => ({
          borderColor: KINPATH_COLOURS.boundary,
          ...t.applyStyles('dark', { borderColor: '#7F8B8F' }),
        }),
      },
    },
    // Hidden header text is positioned absolutely: a scrolling table must be its containing
    // block, or that text lands beyond the window and the whole page scrolls sideways.
    MuiTableContainer: { styleOverrides: { root: { position: 'relative' } } },
    MuiTableCell: {
      defaultProps: { size: 'small' },
      styleOverrides: { head: { fontWeight: 700, whiteSpace: 'nowrap' } },
    },
    MuiLink: { defaultProps: { underline: 'always' } },
    MuiAppBar: { defaultProps: { elevation: 0 } },
    MuiPaper: { defaultProps: { elevation: 0 } },
  },
});
