import { z } from "zod";
import {
  createPointSchema,
  deletePointQuery,
  pointListQuery,
  pointParams,
  updatePointSchema,
} from "@/lib/schemas/points";
import type { Operation } from "../operation";

// Points of each piece of equipment, the site point-list CSV, and the site model in open formats.

const POINT_LIST_HEADER = "equipment_tag, equipment_kind, quantity, unit, expected_interval_s, low_limit, high_limit";

export const pointOperations: Operation[] = [
  {
    method: "get",
    path: "/api/equipment/{equipmentId}/points",
    tag: "Points",
    summary: "The equipment's points",
    access: "signed-in",
    responses: { 200: "Points" },
  },
  {
    method: "post",
    path: "/api/equipment/{equipmentId}/points",
    tag: "Points",
    summary: "Add a point: a quantity, its unit, expected interval and optional limits",
    access: "admin",
    body: createPointSchema,
    responses: { 201: "The point" },
  },
  {
    method: "get",
    path: "/api/points/{pointId}",
    tag: "Points",
    summary: "A point",
    access: "signed-in",
    params: pointParams,
    responses: { 200: "The point" },
  },
  {
    method: "patch",
    path: "/api/points/{pointId}",
    tag: "Points",
    summary: "Edit a point's unit, expected interval or limits",
    access: "admin",
    params: pointParams,
    body: updatePointSchema,
    responses: { 200: "The point" },
  },
  {
    method: "delete",
    path: "/api/points/{pointId}",
    tag: "Points",
    summary: "Remove a point",
    description:
      "Refused (409) while a gateway point map feeds it, and while it has stored readings unless `discardHistory=1`.",
    access: "admin",
    params: pointParams,
    query: deletePointQuery,
    responses: { 204: "Removed" },
  },
  {
    method: "get",
    path: "/api/sites/{siteId}/point-list",
    tag: "Points",
    summary: "The site's points as a point-list CSV",
    access: "signed-in",
    responseType: "text/csv",
    responses: { 200: "The point list" },
  },
  {
    method: "post",
    path: "/api/sites/{siteId}/point-list",
    tag: "Points",
    summary: "Upload a point list for the whole site; `dryRun=1` previews what would be created or changed",
    description: `CSV header: \`${POINT_LIST_HEADER}\`. Nothing is applied unless every row is good; errors come back by line and column.`,
    access: "admin",
    query: pointListQuery,
    body: z.string().describe(`CSV with the header ${POINT_LIST_HEADER}`),
    bodyType: "text/csv",
    responses: { 200: "The plan (preview) or what was applied" },
  },
  {
    method: "get",
    path: "/api/sites/{siteId}/export/brick",
    tag: "Open formats",
    summary: "The site model as a Brick graph (Turtle)",
    access: "signed-in",
    responseType: "text/turtle",
    responses: { 200: "Turtle" },
  },
  {
    method: "get",
    path: "/api/sites/{siteId}/export/haystack",
    tag: "Open formats",
    summary: "The site model as a Project Haystack JSON grid",
    access: "signed-in",
    responses: { 200: "Haystack grid" },
  },
];
