import bcrypt from "bcryptjs";
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { migrateDb, openDb } from "@/db/client";
import { createGateway, revokeGateway, rotateGatewayPassword, verifyGatewayCredentials } from "@/db/queries/gateways";
import { gateways } from "@/db/schema";
import { SERVICE_ORG, seedDemo } from "@/db/seed/demo";
import { systemViewer } from "@/lib/auth/viewer";

// MQTT CONNECT credentials against the stored row: a bcrypt hash from before is replaced by
// scrypt at its first successful check, and a rotation or revocation takes effect at once
// although the old password matched before in this process.

const admin = systemViewer(SERVICE_ORG.id);

function setup() {
  const db = openDb(":memory:");
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  return db;
}
const storedHash = (db: ReturnType<typeof setup>, id: string) =>
  db.select({ h: gateways.passwordHash }).from(gateways).where(eq(gateways.id, id)).get()!.h;

describe("gateway credentials", () => {
  it("replaces a bcrypt hash from before with scrypt at the first successful CONNECT", async () => {
    const db = setup();
    const { gateway } = await createGateway(db, admin, { siteId: "harborview-mob", name: "old", protocol: "json" });
    const legacy = bcrypt.hashSync("old-gateway-password", 4);
    db.update(gateways).set({ passwordHash: legacy }).where(eq(gateways.id, gateway.id)).run();

    expect(await verifyGatewayCredentials(db, gateway.id, "not-it")).toBe("bad_credentials");
    expect(storedHash(db, gateway.id)).toBe(legacy);
    expect(await verifyGatewayCredentials(db, gateway.id, "old-gateway-password")).toMatchObject({
      gatewayId: gateway.id,
    });
    expect(storedHash(db, gateway.id)).toMatch(/^\$scrypt\$ln=10,r=8,p=1\$/);
    expect(await verifyGatewayCredentials(db, gateway.id, "old-gateway-password")).toMatchObject({
      gatewayId: gateway.id,
    });
    expect(await verifyGatewayCredentials(db, gateway.id, "not-it")).toBe("bad_credentials");
  });

  it("refuses the old password right after a rotation, and a revoked gateway with 'revoked'", async () => {
    const db = setup();
    const created = await createGateway(db, admin, { siteId: "harborview-mob", name: "gw", protocol: "json" });
    const id = created.gateway.id;
    expect(await verifyGatewayCredentials(db, id, created.password)).toMatchObject({ gatewayId: id });
    const rotated = await rotateGatewayPassword(db, admin, id);
    expect(await verifyGatewayCredentials(db, id, created.password)).toBe("bad_credentials");
    expect(await verifyGatewayCredentials(db, id, rotated.password)).toMatchObject({ gatewayId: id });
    revokeGateway(db, admin, id);
    expect(await verifyGatewayCredentials(db, id, rotated.password)).toBe("revoked");
    expect(await verifyGatewayCredentials(db, "gw-nobody", rotated.password)).toBe("bad_credentials");
    expect(await verifyGatewayCredentials(db, undefined, undefined)).toBe("bad_credentials");
  });
});
