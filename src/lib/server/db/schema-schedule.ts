// Tables of the schedule area; added to the Database interface in schema.ts.
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface ScheduleTables {}
