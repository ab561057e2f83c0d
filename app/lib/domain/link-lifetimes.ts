// How long e-mailed links work; shared by the server (which enforces it) and the pages (which say it).

/** A password-reset link works once, for 30 minutes (OWASP's forgot-password cheat sheet). */
export const RESET_MINUTES = 30;

/** Invitation links work for 7 days (long enough for a colleague away for a week). */
export const INVITATION_DAYS = 7;
