/**
 * Paints at most once per `interval()` milliseconds, on an animation frame,
 * whatever is latest by then: frames arriving faster than that replace each
 * other unseen, so a fast simulation never keeps the page's thread busy.
 */
export class PaintPacer {
  private last = -Infinity;
  private timer: ReturnType<typeof setTimeout> | undefined;
  private frame: number | undefined;

  constructor(private readonly interval: () => number, private readonly paint: () => void) {}

  /** Ask for a paint: the next animation frame at least `interval()` after the last paint. */
  request(): void {
    if (this.timer !== undefined || this.frame !== undefined) return;
    const onFrame = () => {
      this.timer = undefined;
      this.frame = requestAnimationFrame(() => {
        this.frame = undefined;
        this.now();
      });
    };
    const wait = this.last + this.interval() - performance.now();
    if (wait > 0) this.timer = setTimeout(onFrame, wait);
    else onFrame();
  }

  /** Paint now (a run that stopped shows its last state at once), dropping a paint asked for. */
  now(): void {
    if (this.timer !== undefined) clearTimeout(this.timer);
    if (this.frame !== undefined) cancelAnimationFrame(this.frame);
    this.timer = this.frame = undefined;
    this.last = performance.now();
    this.paint();
  }
}
