/**
 * What a viewer is told of where things are: never the server's own absolute paths (its user,
 * its layout), only names relative to what the server serves. The soaks folder is `soaks`,
 * the prefix of the report URLs (/soaks/NAME/report.html); `syncring serve` prints where it is
 * on disk for whoever started the server.
 */
export const SERVED_SOAKS_DIR = 'soaks';

/** `text` (a message, a page) with the soaks folder's absolute path written as it is served. */
export function asServed(text: string, soaksRoot: string): string {
  return text.split(soaksRoot).join(SERVED_SOAKS_DIR);
}
