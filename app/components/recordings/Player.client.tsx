import { useEffect, useRef } from "react";
import videojs from "video.js";
import "video.js/dist/video-js.css";
import "./player.css";

/**
 * The recording player: video.js, created imperatively inside a wrapper element React does
 * not own, disposed on unmount. Loaded lazily on the watch page only (about 700 kB).
 * Mark ticks on the progress bar are a small video.js component of our own (BenchreelMarkTicks).
 */
export type TickMark = { id: string; tStart: number; tEnd: number | null; text: string };

export type PlayerApi = {
  currentTime(): number;
  seek(t: number): void;
  togglePlay(): void;
  pause(): void;
  paused(): boolean;
  duration(): number;
  step(frames: number, fps: number): void;
  setRate(r: number): void;
};

// biome-ignore lint: video.js component classes are untyped at this level
type AnyComponent = any;
const Component = videojs.getComponent("Component") as AnyComponent;

class BenchreelMarkTicks extends Component {
  marks: TickMark[] = [];
  dur = 0;
  createEl() {
    const el = document.createElement("div");
    el.className = "br-mark-ticks";
    el.setAttribute("aria-hidden", "true");
    return el;
  }
  setMarks(marks: TickMark[], duration: number) {
    this.marks = marks;
    this.dur = duration;
    this.draw();
  }
  draw() {
    const el = this.el() as HTMLElement;
    el.textContent = "";
    if (!this.dur || !Number.isFinite(this.dur)) return;
    for (const m of this.marks) {
      const tick = document.createElement("span");
      const left = Math.max(0, Math.min(100, (m.tStart / this.dur) * 100));
      tick.className = m.tEnd != null ? "br-tick br-tick-span" : "br-tick";
      tick.style.left = `${left}%`;
      if (m.tEnd != null) tick.style.width = `${Math.max(0.4, ((Math.min(m.tEnd, this.dur) - m.tStart) / this.dur) * 100)}%`;
      tick.title = m.text;
      tick.dataset.markId = m.id;
      el.appendChild(tick);
    }
  }
}
if (!videojs.getComponent("BenchreelMarkTicks")) videojs.registerComponent("BenchreelMarkTicks", BenchreelMarkTicks as AnyComponent);

export const PLAYBACK_RATES = [0.25, 0.5, 0.75, 1, 1.25, 1.5, 2];

export default function Player({
  src,
  poster,
  startAt,
  marks,
  onReady,
  onTime,
}: {
  src: string;
  poster?: string;
  startAt?: number | null;
  marks: TickMark[];
  onReady: (api: PlayerApi) => void;
  onTime: (t: number) => void;
}) {
  const holder = useRef<HTMLDivElement>(null);
  const playerRef = useRef<AnyComponent>(null);
  const ticksRef = useRef<BenchreelMarkTicks | null>(null);
  const marksRef = useRef(marks);
  marksRef.current = marks;
  const cb = useRef({ onReady, onTime });
  cb.current = { onReady, onTime };

  useEffect(() => {
    const el = document.createElement("video-js");
    // vjs-16-9 gives the player its height: video.js's own size <style> is off under the page's
    // Content-Security-Policy (VIDEOJS_NO_DYNAMIC_STYLE, set in app/root.tsx).
    el.className = "vjs-benchreel vjs-16-9";
    el.setAttribute("data-testid", "player");
    holder.current!.appendChild(el);
    const player = videojs(el, {
      controls: true,
      preload: "auto",
      fluid: true,
      aspectRatio: "16:9",
      poster,
      playbackRates: PLAYBACK_RATES,
      sources: [{ src, type: "video/mp4" }],
      controlBar: { pictureInPictureToggle: false },
      userActions: { hotkeys: false },
    });
    playerRef.current = player;
    const seekBar = player.getChild("ControlBar")?.getChild("ProgressControl")?.getChild("SeekBar");
    ticksRef.current = seekBar ? (seekBar.addChild("BenchreelMarkTicks") as unknown as BenchreelMarkTicks) : null;
    const redraw = () => ticksRef.current?.setMarks(marksRef.current, player.duration() ?? 0);
    player.on("loadedmetadata", () => {
      redraw();
      if (startAt != null && startAt > 0) player.currentTime(Math.min(startAt, (player.duration() ?? startAt) - 0.01));
    });
    player.on("durationchange", redraw);
    player.on("timeupdate", () => cb.current.onTime(player.currentTime() ?? 0));
    player.on("seeked", () => cb.current.onTime(player.currentTime() ?? 0));
    const api: PlayerApi = {
      currentTime: () => player.currentTime() ?? 0,
      seek: (t) => {
        player.currentTime(Math.max(0, t));
        cb.current.onTime(Math.max(0, t));
      },
      togglePlay: () => (player.paused() ? void player.play()?.catch(() => undefined) : player.pause()),
      pause: () => player.pause(),
      paused: () => player.paused(),
      duration: () => player.duration() ?? 0,
      step: (frames, fps) => {
        player.pause();
        const t = Math.max(0, Math.min(player.duration() ?? Infinity, (player.currentTime() ?? 0) + frames / fps));
        player.currentTime(t);
        cb.current.onTime(t);
      },
      setRate: (r) => player.playbackRate(r),
    };
    player.ready(() => cb.current.onReady(api));
    return () => {
      ticksRef.current = null;
      playerRef.current = null;
      player.dispose();
    };
    // The player is made once per source; marks are pushed in by the effect below.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [src]);

  useEffect(() => {
    const p = playerRef.current;
    if (p && ticksRef.current) ticksRef.current.setMarks(marks, p.duration() ?? 0);
  }, [marks]);

  return <div ref={holder} className="br-player overflow-hidden rounded-lg bg-graphite" />;
}
