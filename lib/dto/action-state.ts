/** What a server action answers its form with (lib/server/actions.ts). */
export type ActionState = { status: "idle" } | { status: "saved" } | { status: "error"; message: string };
