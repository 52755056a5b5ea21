import { main } from "./main.js";
void main();
