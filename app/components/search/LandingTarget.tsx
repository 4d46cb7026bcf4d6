import { useEffect } from "react";
import { useLocation } from "react-router";
import "./landing.css";

/** The class that marks the element a page was opened at (landing.css). */
export const LANDING_CLASS = "landing-target";

/**
 * Brings the element named by the address's fragment (`#spec-…`, `#reading-…`) into view and
 * marks it, for a page a search hit opened. A navigation inside the app changes the address
 * without the browser's own fragment handling (`:target` stays on the old element), and a list
 * drawn after hydration is not there yet at load: so this looks for the element for a while,
 * scrolls to it (smoothly only without prefers-reduced-motion) and moves focus to it for screen
 * readers and keyboards. A text fragment (`#:~:text=`) is the browser's to handle.
 */
export function useLandingTarget() {
  const { hash, key } = useLocation();
  useEffect(() => {
    if (hash.length < 2 || hash.startsWith("#:~:")) return;
    let id: string;
    try {
      id = decodeURIComponent(hash.slice(1));
    } catch {
      return;
    }
    let timer: ReturnType<typeof setTimeout> | undefined;
    let tries = 0;
    const land = () => {
      const el = document.getElementById(id);
      if (!el) {
        if (tries++ < 30) timer = setTimeout(land, 100);
        return;
      }
      for (const old of document.querySelectorAll(`.${LANDING_CLASS}`)) if (old !== el) old.classList.remove(LANDING_CLASS);
      el.classList.add(LANDING_CLASS);
      el.setAttribute("data-landed", "");
      const reduce = window.matchMedia("(prefers-reduced-motion: reduce)").matches;
      el.scrollIntoView({ block: "center", behavior: reduce ? "auto" : "smooth" });
      if (!el.hasAttribute("tabindex")) el.setAttribute("tabindex", "-1");
      el.focus({ preventScroll: true });
    };
    land();
    return () => clearTimeout(timer);
  }, [hash, key]);
}
