// The per-artwork cache of artwork-only results (prepared page, sampling grid, scanner-blur trials).
import { describe, expect, it } from "vitest";
import { ArtworkCache } from "@/lib/imaging/compare/artwork-cache";

const page = (data: Uint8Array, width: number, height: number) => ({ data, width, height });

describe("ArtworkCache", () => {
  it("makes a result once per artwork view and key, and drops the oldest beyond its bound", () => {
    const buffer = new Uint8Array(4 * 4 * 4 * 2);
    const top = page(buffer.subarray(0, 64), 4, 4), bottom = page(buffer.subarray(64), 4, 4);
    const cache = new ArtworkCache<string>(2);
    let made = 0;
    const make = (v: string) => () => (made++, v);
    expect(cache.get(top, "a", make("top a"))).toBe("top a");
    expect(cache.get(top, "a", make("again"))).toBe("top a");
    // Another view of the same buffer is another artwork.
    expect(cache.get(bottom, "a", make("bottom a"))).toBe("bottom a");
    expect(made).toBe(2);
    cache.put(top, "b", "top b");
    expect(cache.peek(top, "a")).toBeUndefined();
    expect(cache.peek(bottom, "a")).toBe("bottom a");
    expect(cache.peek(top, "b")).toBe("top b");
  });
});
