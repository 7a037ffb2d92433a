import Box from '@mui/material/Box';
import { KinpathMark } from './KinpathMark';

/** The mark and the name together, as they appear in the top bar and on the sign-in page. */
export function Brand({ size = 28 }: { size?: number }) {
  return (
    <Box component="span" sx={{ display: 'inline-flex', alignItems: 'center', gap: 1 }}>
      <KinpathMark size={size} />
      <Box
        component="span"
        sx={{ fontWeight: 700, fontSize: size * 0.7, letterSpacing: '0.01em', lineHeight: 1 }}
      >
        Kinpath
      </Box>
    </Box>
  );
}
