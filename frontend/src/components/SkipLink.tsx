import { styled } from '@mui/material/styles';

export const MAIN_CONTENT_ID = 'main-content';

const Link = styled('a')(({ theme }) => ({
  position: 'absolute',
  left: theme.spacing(1),
  top: theme.spacing(-8),
  zIndex: theme.zIndex.tooltip + 1,
  padding: theme.spacing(1, 2),
  borderRadius: theme.shape.borderRadius,
  background: '#FFFFFF',
  color: '#163E3B',
  fontWeight: 700,
  '&:focus': { top: theme.spacing(1) },
}));

/** The first stop for keyboard users: straight past the top bar and navigation. */
export function SkipLink() {
  return <Link href={`#${MAIN_CONTENT_ID}`}>Skip to main content</Link>;
}
