/** JSON shapes of the admin gateway API, shared with the admin island. */
export interface GatewayBedView {
  id: number;
  bedName: string;
  bed: { id: number; label: string; unitCode: string };
  createdAt: string;
}
export interface GatewayView {
  id: number;
  label: string;
  sendingApplication: string;
  sendingFacility: string;
  createdAt: string;
  createdBy: string | null;
  lastMessageAt: string | null;
  revokedAt: string | null;
  revokedBy: string | null;
  revokeReason: string | null;
  beds: GatewayBedView[];
}
export interface GatewayList {
  gateways: GatewayView[];
  beds: { id: number; label: string; unitCode: string; unitName: string }[];
  mllpPort: number | null;
  /** Times are shown in this zone (the first unit's; the hospital's units share one). */
  timeZone: string;
}
