/**
 * Merges sources that are each in ascending `key` order into one ascending
 * stream (a k-way merge over a binary heap: log k comparisons per item, one item
 * per source held at a time). Equal keys come out in source order.
 * @throws Error (from `onDisorder`'s result) when a source is not ascending.
 * @example for await (const x of mergeAscending([[1, 4], [2, 3]], (n) => n)) … // 1, 2, 3, 4
 */
export async function* mergeAscending<T>(
  sources: ReadonlyArray<Iterable<T> | AsyncIterable<T>>,
  key: (item: T) => number,
  onDisorder: (source: number, previous: T, item: T) => Error = () => new Error('a merge source is not in ascending order'),
): AsyncGenerator<T> {
  const iterators = sources.map((s) => (Symbol.asyncIterator in s ? s[Symbol.asyncIterator]() : toAsync(s[Symbol.iterator]())));
  // Heap entries: [key, source, item]; ordered by key, then source.
  const heap: Array<{ key: number; source: number; item: T }> = [];
  const before = (a: { key: number; source: number }, b: { key: number; source: number }): boolean =>
    a.key < b.key || (a.key === b.key && a.source < b.source);
  const push = (entry: { key: number; source: number; item: T }): void => {
    heap.push(entry);
    let k = heap.length - 1;
    while (k > 0) {
      const parent = (k - 1) >> 1;
      if (!before(heap[k]!, heap[parent]!)) break;
      [heap[k], heap[parent]] = [heap[parent]!, heap[k]!];
      k = parent;
    }
  };
  const pop = (): { key: number; source: number; item: T } => {
    const top = heap[0]!;
    const tail = heap.pop()!;
    if (heap.length > 0) {
      heap[0] = tail;
      let k = 0;
      for (;;) {
        const left = 2 * k + 1;
        const right = left + 1;
        let least = k;
        if (left < heap.length && before(heap[left]!, heap[least]!)) least = left;
        if (right < heap.length && before(heap[right]!, heap[least]!)) least = right;
        if (least === k) break;
        [heap[k], heap[least]] = [heap[least]!, heap[k]!];
        k = least;
      }
    }
    return top;
  };
  const advance = async (source: number, previous?: { key: number; item: T }): Promise<void> => {
    const next = await iterators[source]!.next();
    if (next.done === true) return;
    const entry = { key: key(next.value), source, item: next.value };
    if (previous !== undefined && entry.key < previous.key) throw onDisorder(source, previous.item, entry.item);
    push(entry);
  };
  try {
    for (let source = 0; source < iterators.length; source++) await advance(source);
    while (heap.length > 0) {
      const top = pop();
      yield top.item;
      await advance(top.source, top);
    }
  } finally {
    // Close sources still open when the consumer stops early or a source fails.
    await Promise.allSettled(iterators.map((iterator) => iterator.return?.()));
  }
}

async function* toAsync<T>(iterator: Iterator<T>): AsyncGenerator<T> {
  for (let next = iterator.next(); next.done !== true; next = iterator.next()) yield next.value;
}
