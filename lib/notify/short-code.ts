// The short code a text message asks the person to reply with. Derived from the alarm and its
// activation, so it needs no stored column; letters that read alike (0/O, 1/I/L) are left out.

const ALPHABET = "23456789ABCDEFGHJKMNPQRSTUVWXYZ";
export const SHORT_CODE_LENGTH = 5;

/** FNV-1a, 32 bits: enough to tell apart the few alarms one person is waiting on. */
function fnv1a(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h;
}

export function alarmShortCode(alarmId: string, activation: number): string {
  let h = fnv1a(`${alarmId}:${activation}`);
  let code = "";
  for (let i = 0; i < SHORT_CODE_LENGTH; i++) {
    code += ALPHABET[h % ALPHABET.length];
    h = Math.floor(h / ALPHABET.length);
  }
  return code;
}

/** The code in a reply ("ack 7KQ3P", "7kq3p."), or null when the reply holds none. */
export function shortCodeInReply(text: string): string | null {
  const words = text.toUpperCase().match(/[A-Z0-9]+/g) ?? [];
  return words.find((w) => w.length === SHORT_CODE_LENGTH && [...w].every((c) => ALPHABET.includes(c))) ?? null;
}
