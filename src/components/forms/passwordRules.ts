/** Client-side hint only; the server's schema is the rule and its message wins when they differ. */
export const MIN_PASSWORD = 10;
