// Hybrid logical clock (Kulkarni, Demirbas et al., "Logical Physical Clocks", OPODIS 2014).
// A stamp is (wall ms, counter); it never goes backwards on one device even when the device clock
// does, and receiving a remote stamp moves the local clock past it. Stamps are serialised as
// fixed-width strings so that string order equals stamp order: "0001767225600000:00003".
// Ties between devices are broken by device id (see merge rules), never by the raw clock.

export interface HlcStamp {
  wallMs: number;
  counter: number;
}

const WALL_DIGITS = 16;
const COUNTER_DIGITS = 5;
const MAX_COUNTER = 10 ** COUNTER_DIGITS - 1;

export function formatHlc(s: HlcStamp): string {
  return `${String(s.wallMs).padStart(WALL_DIGITS, '0')}:${String(s.counter).padStart(COUNTER_DIGITS, '0')}`;
}

export function parseHlc(text: string): HlcStamp {
  const m = /^(\d{16}):(\d{5})$/.exec(text);
  if (!m) throw new RangeError(`hlc: ${JSON.stringify(text)} is not a stamp of the form 16 digits ":" 5 digits`);
  return { wallMs: Number(m[1]), counter: Number(m[2]) };
}

/** A clock for one device. `now` is injected so tests can skew and freeze time. */
export class HybridLogicalClock {
  private last: HlcStamp = { wallMs: 0, counter: 0 };
  constructor(private readonly now: () => number = Date.now) {}

  /** A stamp for a local event. */
  tick(): string {
    const wall = Math.max(this.now(), this.last.wallMs);
    this.last = wall === this.last.wallMs ? this.bump(wall, this.last.counter) : { wallMs: wall, counter: 0 };
    return formatHlc(this.last);
  }

  /** Merge a stamp received from elsewhere, so later local stamps sort after it. */
  receive(remote: string): void {
    const r = parseHlc(remote);
    const wall = Math.max(this.now(), this.last.wallMs, r.wallMs);
    let counter: number;
    if (wall === this.last.wallMs && wall === r.wallMs) counter = Math.max(this.last.counter, r.counter);
    else if (wall === this.last.wallMs) counter = this.last.counter;
    else if (wall === r.wallMs) counter = r.counter;
    else counter = -1;
    this.last = this.bump(wall, counter);
  }

  /** The latest stamp issued or received (for persisting across restarts). */
  current(): string {
    return formatHlc(this.last);
  }

  /** Restore after a restart, so stamps stay monotonic. */
  restore(stamp: string): void {
    const s = parseHlc(stamp);
    if (s.wallMs > this.last.wallMs || (s.wallMs === this.last.wallMs && s.counter > this.last.counter)) this.last = s;
  }

  private bump(wall: number, counter: number): HlcStamp {
    // Counter overflow: borrow one millisecond rather than break monotonicity.
    return counter + 1 > MAX_COUNTER ? { wallMs: wall + 1, counter: 0 } : { wallMs: wall, counter: counter + 1 };
  }
}
