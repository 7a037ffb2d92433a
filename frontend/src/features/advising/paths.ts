/** The student page's address carries only the opaque ref, never the student number. */
export function studentPagePath(ref: string): string {
  return `/advising/students/${encodeURIComponent(ref)}`;
}
