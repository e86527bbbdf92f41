import { Sequelize } from "sequelize";
import pg from "pg";
import { config } from "../config.server";

// One pool per process; app servers are stateless, so any number can share one database.
let instance: Sequelize | null = null;

export function getSequelize(): Sequelize {
  if (!instance) {
    instance = new Sequelize(config.databaseUrl, {
      dialect: "postgres",
      dialectModule: pg,
      logging: process.env.SQL_LOG === "1" ? console.log : false,
      pool: { max: Number(process.env.DB_POOL_MAX ?? 10), idle: 10_000 },
    });
  }
  return instance;
}

export async function closeSequelize() {
  if (instance) {
    await instance.close();
    instance = null;
  }
}
