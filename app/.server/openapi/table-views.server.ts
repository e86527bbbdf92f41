// Remembered table views: each person's columns, sort, filters and search per table.
import { badRequest, errorResponses, json, notFound, ref, type ApiPart } from "./part.server";

const columnId = { type: "string", minLength: 1, maxLength: 80 };
const tableKey = {
  name: "tableKey",
  in: "path",
  required: true,
  description: "which table: session-gradebook (every practical's gradebook) or course-gradebook",
  schema: { type: "string", enum: ["session-gradebook", "course-gradebook"] },
};

export const tableViewsPart: ApiPart = {
  tags: [{ name: "table views", description: "How each person last left a table (columns shown, sort, filters, search)." }],
  schemas: {
    TableView: {
      type: "object",
      additionalProperties: false,
      properties: {
        hidden: { type: "array", items: columnId, maxItems: 200, description: "ids of the columns not shown" },
        sort: { type: "array", maxItems: 5, items: { type: "object", required: ["id", "desc"], additionalProperties: false, properties: { id: columnId, desc: { type: "boolean" } } } },
        filters: {
          type: "array",
          maxItems: 50,
          description: "a column's filter text: a comparison (\"> 60\"), a range (\"50 to 70\"), \"missing\", or text found in the cell",
          items: { type: "object", required: ["id", "value"], additionalProperties: false, properties: { id: columnId, value: { type: "string", maxLength: 200 } } },
        },
        search: { type: "string", maxLength: 200 },
      },
    },
    TableViewAnswer: { type: "object", required: ["view"], properties: { view: ref("TableView") } },
  },
  paths: {
    "/api/table-views/{tableKey}": {
      get: {
        tags: ["table views"],
        summary: "Your remembered view of a table (an empty view when you have none)",
        parameters: [tableKey],
        responses: { "200": json(ref("TableViewAnswer"), "The view."), ...errorResponses, ...notFound },
      },
      post: {
        tags: ["table views"],
        summary: "Remember your view of a table (the gradebook pages send it as you change the table)",
        parameters: [tableKey],
        requestBody: {
          required: true,
          content: {
            "application/json": {
              schema: ref("TableView"),
              example: { hidden: [], sort: [], filters: [], search: "" },
            },
          },
        },
        responses: { "200": json(ref("TableViewAnswer"), "The view as stored."), ...badRequest, ...errorResponses, ...notFound },
      },
    },
  },
};
