import 'reflect-metadata';
import { DataSource } from 'typeorm';
import { loadDatabaseConfig } from '../config/config';
import { dataSourceOptions } from './options';

/** For the TypeORM CLI: `npm run migration:run -w @kinpath/backend` (on dist). */
export default new DataSource(dataSourceOptions(loadDatabaseConfig()));
