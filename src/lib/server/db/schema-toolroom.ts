// Tables of the toolroom area; added to the Database interface in schema.ts.
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface ToolroomTables {}
