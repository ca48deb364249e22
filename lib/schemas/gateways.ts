import { z } from "zod";
import { gatewayProtocols } from "@/lib/dto/gateways";
import { safeText } from "./text";

// Request shapes for the gateway API; shared with the gateway page's form.
const topicLevel = z.string().regex(/^[A-Za-z0-9._-]{1,64}$/, "letters, digits, dot, underscore or dash (at most 64)");

export const createGatewaySchema = z
  .strictObject({
    siteId: z.string().min(1).max(100),
    name: safeText(z.string().trim().min(1).max(100)),
    protocol: z.enum(gatewayProtocols),
    groupId: topicLevel.optional(),
    edgeNodeId: topicLevel.optional(),
  })
  .refine((v) => v.protocol === "sparkplug" || (v.groupId === undefined && v.edgeNodeId === undefined), {
    message: "groupId and edgeNodeId are for Sparkplug gateways",
    path: ["groupId"],
  });
export type CreateGatewayBody = z.infer<typeof createGatewaySchema>;

export const listGatewaysQuery = z.object({ site: z.string().min(1).max(100).optional() });

export const gatewayParams = z.object({ gatewayId: z.string().min(1).max(100) });
