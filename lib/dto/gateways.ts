export const gatewayProtocols = ["json", "sparkplug"] as const;
export type GatewayProtocol = (typeof gatewayProtocols)[number];

export const gatewayStates = ["unknown", "online", "offline"] as const;
export type GatewayState = (typeof gatewayStates)[number];

export interface GatewayDto {
  id: string;
  siteId: string;
  name: string;
  protocol: GatewayProtocol;
  groupId: string | null;
  edgeNodeId: string | null;
  username: string;
  createdAt: string;
  passwordRotatedAt: string | null;
  revokedAt: string | null;
  /** Topics this gateway publishes on (JSON) or its Sparkplug B node topic. */
  topics: { publish: string[]; subscribe: string[] };
  status: {
    state: GatewayState;
    stateChangedAt: string | null;
    online: boolean;
    lastMessageAt: string | null;
  };
  counters: {
    messages: number;
    readingsAccepted: number;
    readingsDuplicate: number;
    rejected: Record<string, number>;
    rejectedTotal: number;
  };
  unmapped: Array<{ point: string; count: number; lastSeenAt: string }>;
  pointMapSize: number;
}

export interface GatewayCredentials {
  gateway: GatewayDto;
  username: string;
  /** Shown once; only its hash is stored. */
  password: string;
}

export interface PointMapEntryDto {
  gatewayPoint: string;
  pointId: number;
  equipmentTag: string;
  quantity: string;
  unit: string;
}
