"use client";
// Canvas charts need colour strings; these come from the Tailwind tokens (tailwind.config.ts)
// by asking the browser what a token class resolves to, so the charts never carry their own hex.
// The class names are spelled out in full so Tailwind generates them.

const PROBES = {
  ink: "text-ink",
  inkSoft: "text-ink-soft",
  inkFaint: "text-ink-faint",
  inkGhost: "text-ink-ghost",
  paperLine: "text-paper-line",
  paperSunk: "text-paper-sunk",
  pos: "text-pos",
  neg: "text-neg",
  near: "text-near",
  over: "text-over",
  overBright: "text-over-bright",
  nearBright: "text-near-bright",
  silent: "text-silent",
  shelved: "text-shelved",
  brand: "text-brand",
  nightInk: "text-night-ink",
  nightSoft: "text-night-soft",
  nightLine: "text-night-line",
} as const;

export type TokenName = keyof typeof PROBES;
export type TokenColors = Record<TokenName, string>;

let cached: TokenColors | null = null;

export function tokenColors(): TokenColors {
  if (cached) return cached;
  const out = {} as Record<TokenName, string>;
  const probe = document.createElement("span");
  probe.style.display = "none";
  document.body.appendChild(probe);
  for (const [name, cls] of Object.entries(PROBES) as Array<[TokenName, string]>) {
    probe.className = cls;
    out[name] = getComputedStyle(probe).color || "rgb(80, 80, 80)";
  }
  probe.remove();
  cached = out;
  return out;
}

/** The same colour with an alpha, for bands and fills ("rgb(r, g, b)" → "rgba(r, g, b, a)"). */
export function withAlpha(color: string, alpha: number): string {
  const m = /rgba?\(\s*([\d.]+)[ ,]+([\d.]+)[ ,]+([\d.]+)/.exec(color);
  if (!m) return color;
  return `rgba(${m[1]}, ${m[2]}, ${m[3]}, ${alpha})`;
}

/** A token colour lightened toward white by `fraction` (0…1), for bright hues on a dark screen. */
export function lighten(color: string, fraction: number): string {
  const m = /rgba?\(\s*([\d.]+)[ ,]+([\d.]+)[ ,]+([\d.]+)/.exec(color);
  if (!m) return color;
  const mix = (c: string) => Math.round(Number(c) + (255 - Number(c)) * fraction);
  return `rgb(${mix(m[1])}, ${mix(m[2])}, ${mix(m[3])})`;
}
