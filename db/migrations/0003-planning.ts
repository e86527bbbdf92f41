// Planning a practical: student numbers on the roster, groups and who is in them, the course's
// library of reaction systems, lab sessions ("practicals") and their benches (one feed each).
import { DataTypes, type QueryInterface } from "sequelize";

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};
const fk = (model: string, onDelete: "CASCADE" | "SET NULL" | "RESTRICT", allowNull = false) => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model, key: "id" },
  onDelete,
});

export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);

  // The institution's student ID, as it appears on the roster file.
  await qi.addColumn("course_memberships", "student_number", { type: DataTypes.STRING(40), allowNull: true });
  await sql("create unique index course_memberships_student_number on course_memberships (course_id, student_number) where student_number is not null");

  await qi.createTable("groups", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    course_id: fk("courses", "CASCADE"),
    name: { type: DataTypes.STRING(80), allowNull: false },
    ...timestamps,
  });
  await qi.addIndex("groups", ["course_id", "name"], { unique: true, name: "groups_course_name" });
  // Lets group_members prove its course matches its group's.
  await sql("alter table groups add constraint groups_id_course unique (id, course_id)");

  await qi.createTable("group_members", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    group_id: { type: DataTypes.INTEGER, allowNull: false },
    course_id: { type: DataTypes.INTEGER, allowNull: false },
    user_id: fk("users", "CASCADE"),
    ...timestamps,
  });
  await sql(
    "alter table group_members add constraint group_members_group_fk foreign key (group_id, course_id) references groups (id, course_id) on delete cascade",
  );
  // A student is in at most one group of a course.
  await qi.addIndex("group_members", ["course_id", "user_id"], { unique: true, name: "group_members_one_group" });
  await qi.addIndex("group_members", ["group_id"], { name: "group_members_group" });

  await qi.createTable("reaction_systems", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    course_id: fk("courses", "CASCADE"),
    name: { type: DataTypes.STRING(120), allowNull: false },
    species_a: { type: DataTypes.STRING(120), allowNull: false },
    species_b: { type: DataTypes.STRING(120), allowNull: false },
    coeff_a: { type: DataTypes.DOUBLE, allowNull: false },
    coeff_b: { type: DataTypes.DOUBLE, allowNull: false },
    order_a: { type: DataTypes.INTEGER, allowNull: false },
    order_b: { type: DataTypes.INTEGER, allowNull: false },
    k_ref: { type: DataTypes.DOUBLE, allowNull: false },
    t_ref_c: { type: DataTypes.DOUBLE, allowNull: false },
    ea_kj: { type: DataTypes.DOUBLE, allowNull: false },
    reference_source: { type: DataTypes.TEXT, allowNull: false, defaultValue: "" },
    measured: { type: DataTypes.STRING(30), allowNull: false },
    calibration: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    stocks: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    hazards: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    ...timestamps,
  });
  await qi.addIndex("reaction_systems", ["course_id", "name"], { unique: true, name: "reaction_systems_course_name" });
  await sql(
    "alter table reaction_systems add constraint reaction_systems_checks check (" +
      "coeff_a > 0 and coeff_b >= 0 and k_ref > 0 and ea_kj >= 0 and t_ref_c between -50 and 200" +
      " and (order_a, order_b) in ((1,0),(2,0),(1,1))" +
      " and measured in ('concentration','conductivity','absorbance','titration'))",
  );

  await qi.createTable("lab_sessions", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    course_id: fk("courses", "CASCADE"),
    reaction_system_id: fk("reaction_systems", "RESTRICT"),
    title: { type: DataTypes.STRING(160), allowNull: false },
    date: { type: DataTypes.DATEONLY, allowNull: false },
    slot_minutes: { type: DataTypes.INTEGER, allowNull: false },
    setup_minutes: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    reactor_volume_ml: { type: DataTypes.DOUBLE, allowNull: false },
    stock_a_mol_l: { type: DataTypes.DOUBLE, allowNull: false },
    stock_b_mol_l: { type: DataTypes.DOUBLE, allowNull: false },
    sampling_interval_s: { type: DataTypes.INTEGER, allowNull: false },
    target_conversion: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0.8 },
    rubric: { type: DataTypes.JSONB, allowNull: false },
    deadline: { type: DataTypes.DATE, allowNull: true },
    status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: "draft" },
    notified_at: { type: DataTypes.DATE, allowNull: true },
    marks_released_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  });
  await qi.addIndex("lab_sessions", ["course_id", "date"], { name: "lab_sessions_course_date" });
  await sql(
    "alter table lab_sessions add constraint lab_sessions_checks check (" +
      "slot_minutes > 0 and setup_minutes >= 0 and setup_minutes < slot_minutes and reactor_volume_ml > 0" +
      " and stock_a_mol_l > 0 and stock_b_mol_l > 0 and sampling_interval_s > 0" +
      " and target_conversion > 0 and target_conversion < 1" +
      " and status in ('draft','planned','notified','closed'))",
  );

  await qi.createTable("benches", {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    session_id: fk("lab_sessions", "CASCADE"),
    position: { type: DataTypes.INTEGER, allowNull: false },
    label: { type: DataTypes.STRING(20), allowNull: false },
    ca0: { type: DataTypes.DOUBLE, allowNull: false },
    cb0: { type: DataTypes.DOUBLE, allowNull: false },
    temperature_c: { type: DataTypes.DOUBLE, allowNull: false },
    group_id: fk("groups", "SET NULL", true),
    ...timestamps,
  });
  await qi.addIndex("benches", ["session_id", "label"], { unique: true, name: "benches_session_label" });
  // Every bench of a session runs its own feed.
  await qi.addIndex("benches", ["session_id", "ca0", "cb0", "temperature_c"], { unique: true, name: "benches_unique_feed" });
  // A group works at one bench of a session.
  await sql("create unique index benches_one_per_group on benches (session_id, group_id) where group_id is not null");
  await sql(
    "alter table benches add constraint benches_checks check (ca0 > 0 and cb0 >= 0 and temperature_c >= 0 and temperature_c <= 100)",
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  for (const t of ["benches", "lab_sessions", "reaction_systems", "group_members", "groups"]) await qi.dropTable(t, {});
  await qi.sequelize.query("drop index if exists course_memberships_student_number");
  await qi.removeColumn("course_memberships", "student_number");
}
