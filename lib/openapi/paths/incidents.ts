import {
  incidentPatchSchema,
  incidentQuerySchema,
  mergeIncidentSchema,
  splitIncidentSchema,
} from "@/lib/schemas/incidents";
import type { Operation } from "../operation";

// Incidents: related alarm activations of a site grouped automatically, reviewed and named by the team,
// with a plain-language version shared with the customer on request.

export const incidentOperations: Operation[] = [
  {
    method: "get",
    path: "/api/incidents",
    tag: "Incidents",
    summary: "Incidents the caller may see, newest first",
    description:
      "Staff see every site's; a customer only their own organization's incidents whose customer version was shared, never a training site's.",
    access: "signed-in",
    query: incidentQuerySchema,
    responses: { 200: "The incidents" },
  },
  {
    method: "get",
    path: "/api/incidents/{incidentId}",
    tag: "Incidents",
    summary: "One incident's review: members, timeline in event time, trends, key figures",
    description: "A customer gets only the shared incident and its customer version.",
    access: "signed-in",
    responses: { 200: "The review" },
  },
  {
    method: "patch",
    path: "/api/incidents/{incidentId}",
    tag: "Incidents",
    summary:
      "Name it, move its state (open, resolved, reviewed), write cause, lesson and the customer's version, share it",
    access: "staff",
    body: incidentPatchSchema,
    responses: { 200: "The incident" },
  },
  {
    method: "post",
    path: "/api/incidents/{incidentId}/merge",
    tag: "Incidents",
    summary: "Merge another incident of the same site into this one",
    access: "staff",
    body: mergeIncidentSchema,
    responses: { 200: "The merged incident" },
  },
  {
    method: "post",
    path: "/api/incidents/{incidentId}/split",
    tag: "Incidents",
    summary: "Move alarm activations out into a new incident",
    access: "staff",
    body: splitIncidentSchema,
    responses: { 201: "The new incident" },
  },
  {
    method: "get",
    path: "/api/incidents/{incidentId}/report.pdf",
    tag: "Incidents",
    summary: "The review (staff) or the customer's version (customer) as a PDF",
    access: "signed-in",
    responses: { 200: "The PDF" },
    responseType: "application/pdf",
  },
];
