export async function serve(_o: { port?: number; scenario?: string }): Promise<void> { throw new Error('not yet'); }
