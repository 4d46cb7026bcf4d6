import { useCallback, useEffect, useEffectEvent, useRef, useState } from "react";
import videojs from "video.js";
import "video.js/dist/video-js.css";
import { formatTime } from "~/lib/time-format";
import "./player.css";

/**
 * The recording player. video.js plays the file (created imperatively inside an element React
 * does not own, disposed on unmount); the controls are our own, in React, so that they look like
 * the rest of the notebook, carry names a screen reader announces and are big enough for a
 * finger on the tablet. Loaded lazily on the watch page only.
 *
 * Opening at a moment (`startAt`, from `?t=`): no poster is given and the picture stays covered
 * until the first seek has landed, so the first frame anyone sees is the marked one.
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

export const PLAYBACK_RATES = [0.25, 0.5, 0.75, 1, 1.25, 1.5, 2];
const RATE_WORDS: Record<number, string> = { 0.25: "¼×", 0.5: "½×", 0.75: "¾×", 1: "1×", 1.25: "1¼×", 1.5: "1½×", 2: "2×" };
const SKIP_S = 5;

type VjsPlayer = ReturnType<typeof videojs>;
type FullscreenElement = HTMLElement & { webkitRequestFullscreen?: () => void };
type FullscreenDocument = Document & {
  webkitFullscreenElement?: Element | null;
  webkitExitFullscreen?: () => void;
  webkitFullscreenEnabled?: boolean;
};
type AppleVideo = HTMLVideoElement & { webkitEnterFullscreen?: () => void };

export default function Player({
  src,
  poster,
  title,
  startAt,
  durationS,
  fps = 30,
  marks,
  activeMarkId,
  onReady,
  onTime,
  compact = false,
  captionsSrc,
}: {
  src: string;
  poster?: string;
  title: string;
  startAt?: number | null;
  durationS?: number | null;
  fps?: number;
  marks: TickMark[];
  activeMarkId?: string | null;
  onReady: (api: PlayerApi) => void;
  onTime: (t: number) => void;
  /** A small preview (the procedure editor's Video moment): finding a frame only, no speed, volume or full screen. */
  compact?: boolean;
  /** The recording's captions as WebVTT (a new address after a correction loads them again); none, no captions control. */
  captionsSrc?: string | null;
}) {
  const frame = useRef<HTMLDivElement>(null);
  const screen = useRef<HTMLDivElement>(null);
  const playerRef = useRef<VjsPlayer | null>(null);
  const apiRef = useRef<PlayerApi | null>(null);
  const cb = useRef({ onReady, onTime });
  cb.current = { onReady, onTime };
  const opening = startAt != null && startAt > 0 ? startAt : null;

  const [paused, setPaused] = useState(true);
  const [time, setTime] = useState(opening ?? 0);
  const [duration, setDuration] = useState(durationS ?? 0);
  const [muted, setMuted] = useState(false);
  const [volume, setVolume] = useState(1);
  const [rate, setRate] = useState(1);
  const [covered, setCovered] = useState(opening != null);
  const [failed, setFailed] = useState<string | null>(null);
  const [fullscreen, setFullscreen] = useState(false);
  const [canFullscreen, setCanFullscreen] = useState(false);
  const [ready, setReady] = useState(false);
  const [captionsOn, setCaptionsOn] = useState(true);
  const [captionLines, setCaptionLines] = useState<string[]>([]);
  // What the player is made with; read when it is made, without making it again when they change.
  const settings = useEffectEvent(() => ({ title, poster, opening }));

  useEffect(() => {
    const { title, poster, opening } = settings();
    const el = document.createElement("video-js");
    // vjs-16-9 gives the picture its height: video.js's own size <style> is off under the page's
    // Content-Security-Policy (VIDEOJS_NO_DYNAMIC_STYLE, set in app/root.tsx).
    el.className = "vjs-benchreel vjs-16-9";
    el.setAttribute("data-testid", "player");
    screen.current!.appendChild(el);
    const player = videojs(el, {
      controls: false,
      preload: "auto",
      fluid: true,
      aspectRatio: "16:9",
      // No poster when opening at a moment: the marked frame is the first thing shown.
      poster: opening == null ? poster : undefined,
      playbackRates: PLAYBACK_RATES,
      sources: [{ src, type: "video/mp4" }],
      // Only what plays the file; every control is ours (below), and errors are said in our words.
      children: ["mediaLoader", "posterImage", "loadingSpinner"],
      userActions: { hotkeys: false, doubleClick: false },
    });
    playerRef.current = player;
    const root = player.el() as HTMLElement;
    root.setAttribute("aria-label", `Video: ${title}`);
    root.removeAttribute("tabindex");
    const video = root.querySelector("video") as AppleVideo | null;
    video?.setAttribute("aria-label", `Video: ${title}`);
    video?.setAttribute("playsinline", "");
    const doc = document as FullscreenDocument;
    setCanFullscreen(Boolean(doc.fullscreenEnabled || doc.webkitFullscreenEnabled || video?.webkitEnterFullscreen));

    const now = () => player.currentTime() ?? 0;
    const report = () => {
      setTime(now());
      cb.current.onTime(now());
    };
    let landed = opening == null;
    player.on("loadedmetadata", () => {
      const d = player.duration() ?? 0;
      if (Number.isFinite(d) && d > 0) setDuration(d);
      if (opening != null) player.currentTime(Math.min(opening, (Number.isFinite(d) && d > 0 ? d : opening) - 0.01));
    });
    player.on("durationchange", () => {
      const d = player.duration() ?? 0;
      if (Number.isFinite(d) && d > 0) setDuration(d);
    });
    player.on("seeked", () => {
      report();
      if (!landed) {
        landed = true;
        setCovered(false);
      }
    });
    player.on("timeupdate", report);
    player.on("play", () => setPaused(false));
    player.on("pause", () => setPaused(true));
    player.on("ended", () => setPaused(true));
    player.on("volumechange", () => {
      setMuted(Boolean(player.muted()));
      setVolume(player.volume() ?? 1);
    });
    player.on("ratechange", () => setRate(player.playbackRate() ?? 1));
    player.on("error", () => {
      setCovered(false);
      setFailed("This browser could not play the video. Download the original file, or ask an editor to start its processing again.");
    });

    const api: PlayerApi = {
      currentTime: now,
      seek: (t) => {
        const d = player.duration() ?? Infinity;
        const to = Math.max(0, Math.min(Number.isFinite(d) && d > 0 ? d : Infinity, t));
        player.currentTime(to);
        setTime(to);
        cb.current.onTime(to);
      },
      togglePlay: () => (player.paused() ? void player.play()?.catch(() => undefined) : player.pause()),
      pause: () => player.pause(),
      paused: () => player.paused(),
      duration: () => player.duration() ?? 0,
      step: (frames, perSecond) => {
        player.pause();
        api.seek(now() + frames / perSecond);
      },
      setRate: (r) => player.playbackRate(r),
    };
    apiRef.current = api;
    player.ready(() => {
      setReady(true);
      cb.current.onReady(api);
    });
    return () => {
      setReady(false);
      apiRef.current = null;
      playerRef.current = null;
      player.dispose();
    };
    // The player is made once per source; a later ?t= goes through the effect below.
  }, [src]);

  // The captions are a text track the browser reads and times ("hidden": it draws nothing);
  // the lines it says are current are drawn by us, over the picture, in the notebook's type.
  useEffect(() => {
    const player = playerRef.current;
    if (!ready || !player || !captionsSrc) return;
    const el = player.addRemoteTextTrack({ kind: "captions", src: captionsSrc, srclang: "en", label: "Captions", mode: "hidden" }, false);
    const track = (el as unknown as { track: TextTrack }).track;
    track.mode = "hidden";
    const show = () => {
      const lines: string[] = [];
      for (const cue of Array.from(track.activeCues ?? [])) {
        const vtt = cue as VTTCue;
        lines.push(typeof vtt.getCueAsHTML === "function" ? (vtt.getCueAsHTML().textContent ?? "") : vtt.text);
      }
      setCaptionLines(lines);
    };
    track.addEventListener("cuechange", show);
    return () => {
      track.removeEventListener("cuechange", show);
      player.removeRemoteTextTrack(el as unknown as HTMLTrackElement);
      setCaptionLines([]);
    };
  }, [ready, captionsSrc]);

  // A new ?t= on the same page (a link to another moment of this recording) seeks there.
  const firstOpening = useRef(opening);
  useEffect(() => {
    if (opening == null || opening === firstOpening.current) return;
    firstOpening.current = opening;
    apiRef.current?.seek(opening);
  }, [opening]);

  // While playing, the time and the bar follow every frame, not only video.js's 4 timeupdates a second.
  useEffect(() => {
    if (paused) return;
    let id = 0;
    const tick = () => {
      const p = playerRef.current;
      if (p) setTime(p.currentTime() ?? 0);
      id = requestAnimationFrame(tick);
    };
    id = requestAnimationFrame(tick);
    return () => cancelAnimationFrame(id);
  }, [paused]);

  useEffect(() => {
    const doc = document as FullscreenDocument;
    const onChange = () => setFullscreen((doc.fullscreenElement ?? doc.webkitFullscreenElement) === frame.current);
    document.addEventListener("fullscreenchange", onChange);
    document.addEventListener("webkitfullscreenchange", onChange);
    return () => {
      document.removeEventListener("fullscreenchange", onChange);
      document.removeEventListener("webkitfullscreenchange", onChange);
    };
  }, []);

  const toggleFullscreen = useCallback(() => {
    const doc = document as FullscreenDocument;
    const el = frame.current as FullscreenElement | null;
    if (!el) return;
    if (doc.fullscreenElement ?? doc.webkitFullscreenElement) {
      if (doc.exitFullscreen) void doc.exitFullscreen().catch(() => undefined);
      else doc.webkitExitFullscreen?.();
      return;
    }
    if (el.requestFullscreen) void el.requestFullscreen().catch(() => undefined);
    else if (el.webkitRequestFullscreen) el.webkitRequestFullscreen();
    // iPhone Safari can only show the video element itself full screen.
    else (el.querySelector("video") as AppleVideo | null)?.webkitEnterFullscreen?.();
  }, []);

  const api = apiRef.current;
  const d = Math.max(duration, 0);
  const played = d ? Math.min(100, (time / d) * 100) : 0;

  return (
    <div ref={frame} className={`br-player${fullscreen ? " br-full" : ""}`} data-testid="player-frame">
      <div className={`br-screen${covered ? " br-covered" : ""}`} onClick={() => api?.togglePlay()} data-testid="player-screen">
        <div ref={screen} className="br-screen-video" />
        {covered && (
          <p className="br-opening" role="status">
            Opening at <span className="num font-mono">{formatTime(opening)}</span>…
          </p>
        )}
        {captionsSrc && captionsOn && captionLines.length > 0 && !covered && (
          <div className="br-captions" data-testid="player-captions">
            {captionLines.map((line, i) => (
              // biome-ignore lint/suspicious/noArrayIndexKey: the lines on screen at one moment, in the track's order
              <p key={i}>{line}</p>
            ))}
          </div>
        )}
        {failed && (
          <p className="br-failed" role="alert">
            {failed}
          </p>
        )}
      </div>

      <div className="br-controls" role="group" aria-label="Video controls">
        <div className="br-seek">
          <div className="br-track" aria-hidden="true">
            <div className="br-played" style={{ width: `${played}%` }} />
          </div>
          <div className="br-mark-ticks" aria-hidden="true">
            {d > 0 &&
              marks.map((m) => {
                const left = Math.max(0, Math.min(100, (m.tStart / d) * 100));
                const width = m.tEnd != null ? Math.max(0.6, ((Math.min(m.tEnd, d) - m.tStart) / d) * 100) : undefined;
                return (
                  <span
                    key={m.id}
                    className={`br-tick${m.tEnd != null ? " br-tick-span" : ""}${m.id === activeMarkId ? " br-tick-active" : ""}`}
                    style={width != null ? { left: `${left}%`, width: `${width}%` } : { left: `${left}%` }}
                    title={`${formatTime(m.tStart)} ${m.text}`}
                    data-mark-id={m.id}
                  />
                );
              })}
          </div>
          <input
            type="range"
            className="br-range"
            min={0}
            max={d || 1}
            step={0.01}
            value={Math.min(time, d || 1)}
            disabled={!ready || !d}
            aria-label="Position in the video"
            aria-valuetext={`${formatTime(time)} of ${formatTime(d)}`}
            onChange={(e) => api?.seek(e.currentTarget.valueAsNumber)}
          />
        </div>

        <div className="br-buttons">
          <button
            type="button"
            className="br-btn br-play"
            onClick={() => api?.togglePlay()}
            disabled={!ready}
            aria-label={paused ? "Play" : "Pause"}
            data-testid="player-play"
          >
            {paused ? <PlayIcon /> : <PauseIcon />}
          </button>
          <button
            type="button"
            className="br-btn"
            onClick={() => api?.seek(time - SKIP_S)}
            disabled={!ready}
            aria-label={`Back ${SKIP_S} seconds`}
          >
            <span aria-hidden="true" className="num">
              −{SKIP_S} s
            </span>
          </button>
          <button
            type="button"
            className="br-btn"
            onClick={() => api?.seek(time + SKIP_S)}
            disabled={!ready}
            aria-label={`Forward ${SKIP_S} seconds`}
          >
            <span aria-hidden="true" className="num">
              +{SKIP_S} s
            </span>
          </button>
          <button
            type="button"
            className="br-btn br-narrow"
            onClick={() => api?.step(-1, fps)}
            disabled={!ready}
            aria-label="One frame back"
          >
            <FrameIcon back />
          </button>
          <button type="button" className="br-btn br-narrow" onClick={() => api?.step(1, fps)} disabled={!ready} aria-label="One frame on">
            <FrameIcon />
          </button>
          <p className="br-time num" data-testid="player-time">
            <span className="sr-only">At </span>
            <span className="br-now">{formatTime(time)}</span>
            <span aria-hidden="true"> / </span>
            <span className="sr-only"> of </span>
            <span>{formatTime(d || null)}</span>
          </p>
          {!compact && (
            <>
              <span className="br-spacer" />
              <label className="br-rate">
                <span className="sr-only">Playback speed</span>
                <select
                  value={rate}
                  disabled={!ready}
                  onChange={(e) => api?.setRate(Number(e.currentTarget.value))}
                  data-testid="player-rate"
                >
                  {PLAYBACK_RATES.map((r) => (
                    <option key={r} value={r}>
                      {RATE_WORDS[r] ?? `${r}×`}
                    </option>
                  ))}
                </select>
              </label>
              {captionsSrc && (
                <button
                  type="button"
                  className="br-btn br-cc"
                  onClick={() => setCaptionsOn((v) => !v)}
                  aria-label="Captions"
                  aria-pressed={captionsOn}
                  data-testid="player-captions-toggle"
                >
                  <span aria-hidden="true">CC</span>
                </button>
              )}
              <button
                type="button"
                className="br-btn"
                onClick={() => playerRef.current?.muted(!muted)}
                disabled={!ready}
                aria-label="Mute"
                aria-pressed={muted}
              >
                <SoundIcon off={muted} />
              </button>
              <input
                type="range"
                className="br-range br-volume"
                min={0}
                max={1}
                step={0.05}
                value={muted ? 0 : volume}
                disabled={!ready}
                aria-label="Volume"
                aria-valuetext={`${Math.round((muted ? 0 : volume) * 100)} %`}
                onChange={(e) => {
                  const p = playerRef.current;
                  if (!p) return;
                  p.volume(e.currentTarget.valueAsNumber);
                  p.muted(e.currentTarget.valueAsNumber === 0);
                }}
              />
              {canFullscreen && (
                <button
                  type="button"
                  className="br-btn"
                  onClick={toggleFullscreen}
                  aria-label={fullscreen ? "Leave full screen" : "Full screen"}
                >
                  <FullscreenIcon leave={fullscreen} />
                </button>
              )}
            </>
          )}
        </div>
      </div>
    </div>
  );
}

function PlayIcon() {
  return (
    <svg width="18" height="18" viewBox="0 0 18 18" aria-hidden="true" focusable="false">
      <path d="M5 3.2v11.6L14.6 9z" fill="currentColor" />
    </svg>
  );
}

function PauseIcon() {
  return (
    <svg width="18" height="18" viewBox="0 0 18 18" aria-hidden="true" focusable="false">
      <rect x="4" y="3.5" width="3.4" height="11" rx="0.8" fill="currentColor" />
      <rect x="10.6" y="3.5" width="3.4" height="11" rx="0.8" fill="currentColor" />
    </svg>
  );
}

function FrameIcon({ back = false }: { back?: boolean }) {
  return (
    <svg width="18" height="18" viewBox="0 0 18 18" aria-hidden="true" focusable="false" className={back ? "br-flip" : undefined}>
      <path d="M4 4.5v9L10.5 9z" fill="currentColor" />
      <rect x="12" y="4.5" width="2.2" height="9" rx="0.6" fill="currentColor" />
    </svg>
  );
}

function SoundIcon({ off }: { off: boolean }) {
  return (
    <svg width="18" height="18" viewBox="0 0 18 18" aria-hidden="true" focusable="false">
      <path d="M2.5 6.8h3L9.5 3.5v11l-4-3.3h-3z" fill="currentColor" />
      {off ? (
        <path d="M12 6.5l4 5M16 6.5l-4 5" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" fill="none" />
      ) : (
        <path
          d="M12 6.3a3.8 3.8 0 010 5.4M14 4.4a6.5 6.5 0 010 9.2"
          stroke="currentColor"
          strokeWidth="1.5"
          strokeLinecap="round"
          fill="none"
        />
      )}
    </svg>
  );
}

function FullscreenIcon({ leave }: { leave: boolean }) {
  return (
    <svg width="18" height="18" viewBox="0 0 18 18" aria-hidden="true" focusable="false">
      <path
        d={leave ? "M7 3v4H3M11 3v4h4M7 15v-4H3M11 15v-4h4" : "M3 7V3h4M15 7V3h-4M3 11v4h4M15 11v4h-4"}
        stroke="currentColor"
        strokeWidth="1.7"
        strokeLinecap="round"
        strokeLinejoin="round"
        fill="none"
      />
    </svg>
  );
}
