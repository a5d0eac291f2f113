/** A request body that arrives in `chunkSize` pieces, then ends or (with `failAfter`) breaks off like a dropped connection. */
export function chunkedStream(bytes: Uint8Array, { chunkSize = 16 * 1024, failAfter }: { chunkSize?: number; failAfter?: number } = {}): ReadableStream<Uint8Array> {
  let offset = 0;
  return new ReadableStream({
    pull(controller) {
      if (failAfter !== undefined && offset >= failAfter) return controller.error(new Error('connection reset by the client'));
      if (offset >= bytes.length) return controller.close();
      controller.enqueue(bytes.slice(offset, offset + chunkSize));
      offset += chunkSize;
    },
  });
}
