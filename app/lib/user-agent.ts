// A short, readable name for a browser from its User-Agent header (for the account page's
// list of sessions). Common practice, no source: order matters, since Chromium-based browsers
// also say "Safari" and Edge also says "Chrome".
export function browserName(userAgent: string): string {
  const ua = userAgent ?? "";
  if (!ua) return "Unknown browser";
  const browser = /Edg\//.test(ua) ? "Edge" : /Firefox\//.test(ua) ? "Firefox" : /Chrom(e|ium)\//.test(ua) ? "Chromium-based browser" : /Safari\//.test(ua) ? "Safari" : "Other browser";
  const system = /Android/.test(ua) ? "Android" : /iPhone|iPad/.test(ua) ? "iOS" : /Windows/.test(ua) ? "Windows" : /Mac OS X/.test(ua) ? "macOS" : /Linux/.test(ua) ? "Linux" : "";
  return system ? `${browser} on ${system}` : browser;
}
