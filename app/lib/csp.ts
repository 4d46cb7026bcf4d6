/**
 * The nonce of this page's Content-Security-Policy, for code in the browser that must add a
 * <style> element (TipTap's base styles). The browser hides nonce attributes from the DOM but
 * keeps the `nonce` property of the elements that had one, such as React Router's scripts.
 * Taken from the document, not from loader data: a client navigation's data comes from another
 * response with another nonce, while the page keeps the policy it was loaded with.
 */
export function documentNonce(): string | undefined {
  if (typeof document === "undefined") return undefined;
  return document.querySelector<HTMLScriptElement>("script[nonce]")?.nonce || undefined;
}
