// The e-mailed acknowledge link: the token's shape and what a refused link says, shared by
// the page that shows the alarm and the route that acknowledges it.

export const ACK_TOKEN_PATTERN = /^[A-Za-z0-9_-]{20,100}$/;

export const ackLinkRefusal = {
  unknown: "This acknowledge link is not valid.",
  expired: "This acknowledge link has expired. Open the alarm in Liftline instead.",
  used: "This acknowledge link was already used.",
} as const;
