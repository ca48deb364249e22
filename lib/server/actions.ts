import type { ActionState } from "@/lib/dto/action-state";
import { isAppError } from "@/lib/errors";
import { unavailableMessage } from "@/lib/storage-messages";
import { storageHealth } from "./runtime";
import { storageFailure } from "./storage-health";

// Server actions answer their form with a state instead of an HTTP status: the same errors
// route() maps (an AppError, a database that cannot be written) become a message to show.
// Anything else, Next's redirects included, is thrown on.

export type { ActionState };

export async function runAction(name: string, work: () => Promise<void> | void): Promise<ActionState> {
  try {
    await work();
    return { status: "saved" };
  } catch (err) {
    const storage = storageFailure(err);
    if (storage) {
      storageHealth().report(err, `action ${name}`);
      return { status: "error", message: unavailableMessage(storage.kind) };
    }
    if (isAppError(err)) return { status: "error", message: err.message };
    throw err;
  }
}
