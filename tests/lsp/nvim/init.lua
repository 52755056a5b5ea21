-- Neovim 0.7 (Debian 12) as a real LSP client of `npx ferrule lsp --stdio`: opens one file of a
-- workspace, waits for ferrule's diagnostics, optionally asks for a hover, writes what it got to
-- FERRULE_OUT and quits. Only the built-in client is used (vim.lsp.start_client and
-- vim.lsp.buf_attach_client; vim.lsp.start needs 0.8).
local root = os.getenv("FERRULE_ROOT")
local ws = os.getenv("FERRULE_WS")
local file = os.getenv("FERRULE_FILE")
local out = os.getenv("FERRULE_OUT")
local hover_line = tonumber(os.getenv("FERRULE_HOVER_LINE") or "")
local hover_col = tonumber(os.getenv("FERRULE_HOVER_COL") or "")

local lines = {}
local function finish(code)
  local f = io.open(out, "w")
  f:write(table.concat(lines, "\n") .. "\n")
  f:close()
  vim.cmd((code == 0) and "qa!" or "cquit! " .. code)
end

local client_id = vim.lsp.start_client({
  name = "ferrule",
  cmd = { "npx", "ferrule", "lsp", "--stdio" },
  cmd_cwd = root,
  root_dir = ws,
  workspace_folders = { { uri = vim.uri_from_fname(ws), name = "workspace" } },
  on_exit = function(code) table.insert(lines, "server-exit " .. tostring(code)) end,
})
if not client_id then
  table.insert(lines, "error: could not start the server")
  finish(3)
  return
end

vim.cmd("edit " .. vim.fn.fnameescape(file))
local buf = vim.api.nvim_get_current_buf()
vim.lsp.buf_attach_client(buf, client_id)

local ok = vim.wait(90000, function() return #vim.diagnostic.get(buf) > 0 end, 50)
if not ok then
  table.insert(lines, "error: no diagnostics within 90 s")
  finish(4)
  return
end
vim.wait(500) -- let a second publish (if any) land
for _, d in ipairs(vim.diagnostic.get(buf)) do
  local code = d.code
  if code == nil and d.user_data and d.user_data.lsp then code = d.user_data.lsp.code end
  table.insert(lines, string.format("diag\t%d\t%d\t%d\t%s\t%s", d.lnum, d.col, d.severity, tostring(code or ""), (d.message:gsub("\n", " "))))
end

if hover_line then
  local client = vim.lsp.get_client_by_id(client_id)
  local params = { textDocument = { uri = vim.uri_from_bufnr(buf) }, position = { line = hover_line, character = hover_col } }
  local res = client.request_sync("textDocument/hover", params, 30000, buf)
  if res and res.result and res.result.contents then
    local value = res.result.contents.value or ""
    for l in value:gmatch("[^\n]+") do table.insert(lines, "hover\t" .. l) end
  else
    table.insert(lines, "error: no hover")
  end
end

vim.lsp.stop_client(client_id)
vim.wait(300)
finish(0)
