import { KINPATH_COLOURS } from '../app/theme';

interface KinpathMarkProps {
  size?: number;
  /** Give a title only where the mark stands alone; beside the word "Kinpath" it is decoration. */
  title?: string;
}

/**
 * Kinpath's mark: two strands, the kin (from the left) and the student's own path (from below),
 * meet and go on as one line toward the next term.
 */
export function KinpathMark({ size = 32, title }: KinpathMarkProps) {
  return (
    <svg
      width={size}
      height={size}
      viewBox="0 0 32 32"
      role={title ? 'img' : undefined}
      aria-hidden={title ? undefined : true}
      focusable="false"
    >
      {title ? <title>{title}</title> : null}
      <rect width="32" height="32" rx="8" fill={KINPATH_COLOURS.pine} />
      <g fill="none" stroke="#FFFFFF" strokeWidth="2.6" strokeLinecap="round">
        <path d="M6.5 16C10.5 16 13.5 17.5 17.5 14.5" />
        <path d="M15 25.5C15 21.5 15.5 17.5 17.5 14.5" />
        <path d="M17.5 14.5L23.5 8.5" />
      </g>
      <circle cx="6.5" cy="16" r="2.6" fill={KINPATH_COLOURS.clayLight} />
      <circle cx="15" cy="25.5" r="2.6" fill={KINPATH_COLOURS.clayLight} />
      <circle cx="24" cy="8" r="3.1" fill="#FFFFFF" />
    </svg>
  );
}
