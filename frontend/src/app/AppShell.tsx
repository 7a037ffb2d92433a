import { useEffect, useRef } from 'react';
import {
  NavLink,
  Link as RouterLink,
  Outlet,
  useLocation,
  useNavigate,
  useNavigation,
} from 'react-router';
import AppBar from '@mui/material/AppBar';
import Box from '@mui/material/Box';
import Button from '@mui/material/Button';
import List from '@mui/material/List';
import ListItemButton from '@mui/material/ListItemButton';
import Toolbar from '@mui/material/Toolbar';
import Typography from '@mui/material/Typography';
import Logout from '@mui/icons-material/Logout';
import { ROLE_LABELS, type Role, type UserSummary } from '@kinpath/contracts';
import { Brand } from '../components/Brand';
import { MAIN_CONTENT_ID, SkipLink } from '../components/SkipLink';
import { useAuth } from '../features/auth/AuthProvider';
import { PageLoading } from './PageLoad';
import { navigationFor } from './pages';
import { KINPATH_COLOURS } from './theme';

function TopBar({ user, onSignOut }: { user: UserSummary | null; onSignOut: () => void }) {
  return (
    <AppBar
      component="header"
      position="static"
      sx={(t) => ({
        bgcolor: KINPATH_COLOURS.pineDeep,
        color: '#FFFFFF',
        // Focus rings in the bar are drawn in white so they show against the pine.
        '--kp-focus-ring': '#FFFFFF',
        ...t.applyStyles('dark', {
          bgcolor: KINPATH_COLOURS.nightSurface,
          borderBottom: 1,
          borderColor: 'divider',
        }),
      })}
    >
      <Toolbar variant="dense" sx={{ gap: 2, minHeight: 56 }}>
        <Box
          component={RouterLink}
          to="/"
          sx={{ color: 'inherit', textDecoration: 'none', borderRadius: 1, mr: 'auto' }}
        >
          <Brand />
        </Box>
        {user ? (
          <>
            <Box sx={{ textAlign: 'right', lineHeight: 1.2, display: { xs: 'none', sm: 'block' } }}>
              <Typography component="p" sx={{ fontWeight: 700, fontSize: '0.95rem' }}>
                {user.displayName}
              </Typography>
              <Typography
                component="p"
                sx={{ fontSize: '0.8rem', color: KINPATH_COLOURS.pineMist }}
              >
                {ROLE_LABELS[user.role]}
                {user.department ? ` · ${user.department}` : ''}
              </Typography>
            </Box>
            <Button
              color="inherit"
              variant="outlined"
              size="small"
              startIcon={<Logout aria-hidden />}
              onClick={onSignOut}
              sx={{ borderColor: 'rgba(255,255,255,0.7)' }}
            >
              Sign out
            </Button>
          </>
        ) : null}
      </Toolbar>
    </AppBar>
  );
}

function RoleNavigation({ role }: { role: Role }) {
  const items = navigationFor(role);
  return (
    <Box
      component="nav"
      aria-label="Main"
      sx={{
        flexShrink: 0,
        width: { xs: '100%', md: 232 },
        // Widths only: a responsive `border` shorthand would reset the colour in its media query.
        borderStyle: 'solid',
        borderWidth: 0,
        borderRightWidth: { md: 1 },
        borderBottomWidth: { xs: 1, md: 0 },
        borderColor: 'divider',
        bgcolor: 'background.paper',
      }}
    >
      <List
        dense
        sx={{
          display: 'flex',
          flexDirection: { xs: 'row', md: 'column' },
          // A narrow window wraps the links onto more lines instead of scrolling the page.
          flexWrap: { xs: 'wrap', md: 'nowrap' },
          gap: 0.5,
          p: 1,
        }}
      >
        {items.map((item) => (
          <li key={item.path}>
            <ListItemButton
              component={NavLink}
              to={item.path}
              end={item.end}
              sx={{
                borderRadius: 1,
                borderLeft: 3,
                borderColor: 'transparent',
                // The current page is marked by weight and a bar, not by colour alone.
                '&[aria-current="page"]': {
                  borderColor: 'primary.main',
                  fontWeight: 700,
                  bgcolor: 'action.selected',
                },
              }}
            >
              {item.navLabel}
            </ListItemButton>
          </li>
        ))}
      </List>
    </Box>
  );
}

/** The frame of every page after sign-in: top bar, the role's navigation, and the page. */
export function AppShell() {
  const { user, signOut } = useAuth();
  const navigate = useNavigate();
  const { pathname } = useLocation();
  const mainRef = useRef<HTMLElement>(null);
  const firstPath = useRef(pathname);
  // Pages have no loaders, so the router is loading only while a page's code is fetched.
  const loadingPage = useNavigation().state === 'loading';

  // After client-side navigation, move focus to the new page so screen readers announce it.
  useEffect(() => {
    if (pathname !== firstPath.current) mainRef.current?.focus();
  }, [pathname]);

  const handleSignOut = () => {
    signOut();
    navigate('/sign-in', { replace: true });
  };

  return (
    <Box sx={{ minHeight: '100vh', display: 'flex', flexDirection: 'column' }}>
      <SkipLink />
      <TopBar user={user} onSignOut={handleSignOut} />
      <Box sx={{ flex: 1, display: 'flex', flexDirection: { xs: 'column', md: 'row' } }}>
        {user ? <RoleNavigation role={user.role} /> : null}
        <Box
          component="main"
          id={MAIN_CONTENT_ID}
          ref={mainRef}
          tabIndex={-1}
          aria-busy={loadingPage || undefined}
          sx={{
            flex: 1,
            minWidth: 0,
            px: { xs: 2, md: 4 },
            py: { xs: 2, md: 3 },
            outline: 'none',
            position: 'relative',
          }}
        >
          {loadingPage ? (
            <Box sx={{ position: 'absolute', top: 0, left: 0, right: 0 }}>
              <PageLoading />
            </Box>
          ) : null}
          <Outlet />
        </Box>
      </Box>
    </Box>
  );
}
