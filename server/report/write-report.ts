export function writeReport(dir: string, out?: string): string {
  throw new Error(`not yet: ${dir} ${out}`);
}
