/**
 * A department code of five letters, the first given and four from the clock, so that
 * every run imports new courses and new files (the server refuses a file committed before).
 */
export function runDepartment(first: string): string {
  let n = Math.floor(Date.now() / 1000);
  let code = '';
  for (let i = 0; i < 4; i++) {
    code = String.fromCharCode(65 + (n % 26)) + code;
    n = Math.floor(n / 26);
  }
  return `${first}${code}`;
}
