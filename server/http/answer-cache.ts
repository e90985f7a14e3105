/**
 * Answers of slow computations kept by the question they answer: one computation per key
 * (concurrent requests share it), the least recently asked dropped first, failures not kept
 * (the next request tries again).
 */
export class AnswerCache<T> {
  private readonly answers = new Map<string, Promise<T>>();

  constructor(private readonly size: number) {}

  get(key: string, compute: () => Promise<T>): { result: Promise<T>; fromCache: boolean } {
    const hit = this.answers.get(key);
    if (hit) {
      this.answers.delete(key);
      this.answers.set(key, hit);
      return { result: hit, fromCache: true };
    }
    const result = compute();
    this.answers.set(key, result);
    result.catch(() => this.answers.delete(key));
    while (this.answers.size > this.size) this.answers.delete(this.answers.keys().next().value!);
    return { result, fromCache: false };
  }
}
